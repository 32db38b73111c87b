import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { createUserInputSchema, PASSWORD_MIN_LENGTH, ROLES, ROLE_LABELS } from '../../../../shared/schemas/users.ts';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import { SelectField, TextField } from '../../../components/ui/field.tsx';
import { applyApiFieldErrors } from '../../../lib/form.ts';
import { useCreateUser } from '../api/create-user.ts';

type FormIn = z.input<typeof createUserInputSchema>;
type FormOut = z.output<typeof createUserInputSchema>;
const FIELDS = ['email', 'fullName', 'initials', 'role', 'password'] as const;

const EMPTY: FormIn = { email: '', fullName: '', initials: '', role: 'technician', password: '' };

export function CreateUserForm() {
  const create = useCreateUser();
  const [banner, setBanner] = useState<string | null>(null);
  const [created, setCreated] = useState<string | null>(null);
  const form = useForm<FormIn, unknown, FormOut>({ resolver: zodResolver(createUserInputSchema), defaultValues: EMPTY });
  const { errors } = form.formState;

  const onSubmit = form.handleSubmit((values) => {
    setBanner(null);
    setCreated(null);
    create.mutate(values, {
      onSuccess: (res) => {
        setCreated(`${res.user?.fullName ?? values.fullName} can now sign in as ${res.user?.email ?? values.email}.`);
        form.reset(EMPTY);
      },
      onError: (error) => setBanner(applyApiFieldErrors(error, form.setError, FIELDS)),
    });
  });

  return (
    <form noValidate onSubmit={onSubmit} aria-labelledby="create-user-title" className="flex flex-col gap-4" data-testid="create-user-form">
      <h2 id="create-user-title" className="text-xl font-bold">
        Create an account
      </h2>
      {banner ? <Banner title="The account was not created">{banner}</Banner> : null}
      {created ? <Banner tone="ok" title="Account created">{created}</Banner> : null}
      <div className="grid gap-4 md:grid-cols-2">
        <TextField label="Full name" registration={form.register('fullName')} error={errors.fullName?.message} autoComplete="off" />
        <TextField
          label="Initials"
          registration={form.register('initials')}
          error={errors.initials?.message}
          hint="Shown on records and labels, e.g. MT"
          maxLength={5}
        />
        <TextField
          label="Email address"
          type="email"
          inputMode="email"
          registration={form.register('email')}
          error={errors.email?.message}
        />
        <SelectField
          label="Role"
          registration={form.register('role')}
          error={errors.role?.message}
          options={ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }))}
        />
        <TextField
          label="First password"
          type="password"
          autoComplete="new-password"
          registration={form.register('password')}
          error={errors.password?.message}
          hint={`At least ${PASSWORD_MIN_LENGTH} characters, not their name or e-mail. It is temporary: they choose their own at first sign-in. Give it to the person directly, never by e-mail.`}
          className="md:col-span-2"
        />
      </div>
      <div>
        <Button type="submit" busy={create.isPending} data-testid="create-user-submit">
          Create account
        </Button>
      </div>
    </form>
  );
}
