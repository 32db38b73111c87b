import { useQuery } from '@tanstack/react-query';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { useAuth } from '../auth/use-auth.ts';
import { userQueries } from './api/user-queries.ts';
import { CreateUserForm } from './components/create-user-form.tsx';
import { UserTable } from './components/user-table.tsx';

export function UsersPage() {
  const auth = useAuth();
  const users = useQuery(userQueries.list());
  if (auth.status !== 'signed-in') return null;

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Users">
        One personal account per person. Deactivate accounts instead of deleting them, so the records people signed
        keep their names. Every change here is recorded by the server.
      </PageHeader>

      {users.isPending ? <Spinner label="Loading users…" /> : null}
      {users.isError ? <Banner title="Could not load the users">{users.error.message}</Banner> : null}
      {users.data ? <UserTable users={users.data} currentUserId={auth.user.id} /> : null}

      <Panel>
        <CreateUserForm />
      </Panel>
    </div>
  );
}
