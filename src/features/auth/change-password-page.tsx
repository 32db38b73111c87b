import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { passwordProblem, PASSWORD_MIN_LENGTH } from '../../../shared/schemas/password-rules.ts';
import { Brand } from '../../app/brand.tsx';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader } from '../../components/ui/feedback.tsx';
import { TextField } from '../../components/ui/field.tsx';
import { applyApiFieldErrors } from '../../lib/form.ts';
import { useChangePassword } from './api/account.ts';
import { useSignOut } from './api/sign-out.ts';
import { useAuth } from './use-auth.ts';

const formSchema = z
  .object({
    currentPassword: z.string().min(1, 'Enter your current password'),
    newPassword: z.string(),
    confirmPassword: z.string(),
  })
  .superRefine((v, ctx) => {
    if (v.confirmPassword !== v.newPassword) ctx.addIssue({ code: 'custom', path: ['confirmPassword'], message: 'The two new passwords differ' });
  });
type FormValues = z.infer<typeof formSchema>;

const RULES = [
  `At least ${PASSWORD_MIN_LENGTH} characters; a few unrelated words are easy to type and hard to guess.`,
  'Not your name or e-mail address, not a common password, not the name of this application.',
  'Yours alone: nobody else, an administrator included, may know it.',
];

/**
 * Change password. `forced`: shown instead of every page after a sign-in with a password an administrator
 * set (the server refuses everything else with 403 password_change_required until it is done).
 */
export function ChangePasswordPage({ forced = false }: { forced?: boolean }) {
  const auth = useAuth();
  const change = useChangePassword();
  const signOut = useSignOut();
  const [banner, setBanner] = useState<string | null>(null);
  const [done, setDone] = useState(false);
  const user = auth.status === 'signed-in' ? auth.user : null;
  const form = useForm<FormValues>({
    resolver: zodResolver(formSchema),
    defaultValues: { currentPassword: '', newPassword: '', confirmPassword: '' },
  });
  const { errors } = form.formState;

  const onSubmit = form.handleSubmit((values) => {
    setBanner(null);
    setDone(false);
    const problem = passwordProblem(values.newPassword, { email: user?.email, fullName: user?.fullName });
    if (problem) {
      form.setError('newPassword', { type: 'rule', message: problem });
      return;
    }
    change.mutate(
      { currentPassword: values.currentPassword, newPassword: values.newPassword },
      {
        onSuccess: () => {
          form.reset();
          setDone(true);
        },
        onError: (error) => {
          const message = applyApiFieldErrors(error, form.setError, ['currentPassword', 'newPassword']);
          if (message) setBanner(message);
        },
      },
    );
  });

  const body = (
    <div className="w-full max-w-md">
      {forced ? (
        <>
          <h1 className="text-3xl font-bold tracking-tight">Choose your own password</h1>
          <p className="mt-2 text-ink-soft" data-testid="forced-password-explainer">
            An administrator set the password you signed in with, so someone else knows it. Choose your own before you
            do anything else: until then Tarebook opens no record and accepts no signature.
          </p>
        </>
      ) : (
        <PageHeader title="Change password" />
      )}
      <ul className="mt-4 list-disc space-y-1 pl-5 text-sm text-ink-soft">
        {RULES.map((r) => (
          <li key={r}>{r}</li>
        ))}
      </ul>
      <form noValidate onSubmit={onSubmit} className="mt-6 flex flex-col gap-5">
        {banner ? <Banner testId="change-password-error" title="The password was not changed">{banner}</Banner> : null}
        {done ? (
          <Banner tone="ok" testId="change-password-done" title="Password changed">
            Every other session of your account has ended; this one continues.
          </Banner>
        ) : null}
        <TextField
          label={forced ? 'Password you signed in with' : 'Current password'}
          type="password"
          autoComplete="current-password"
          registration={form.register('currentPassword')}
          error={errors.currentPassword?.message}
        />
        <TextField
          label="New password"
          type="password"
          autoComplete="new-password"
          registration={form.register('newPassword')}
          error={errors.newPassword?.message}
        />
        <TextField
          label="New password again"
          type="password"
          autoComplete="new-password"
          registration={form.register('confirmPassword')}
          error={errors.confirmPassword?.message}
        />
        <Button type="submit" busy={change.isPending} data-testid="change-password-submit" className="w-full text-lg">
          Change password
        </Button>
        {forced ? (
          <Button variant="secondary" busy={signOut.isPending} onClick={() => signOut.mutate()} data-testid="forced-sign-out">
            Sign out
          </Button>
        ) : null}
      </form>
    </div>
  );

  if (!forced) return body;
  return (
    <div className="flex min-h-screen flex-col bg-paper lg:flex-row">
      <div className="flex items-center bg-slate-900 px-6 py-6 text-white lg:w-[26rem] lg:flex-col lg:items-start lg:p-10">
        <Brand />
      </div>
      <main className="flex flex-1 items-start justify-center px-4 py-10 sm:items-center">{body}</main>
    </div>
  );
}
