import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Navigate, useLocation, useNavigate } from 'react-router';
import type { z } from 'zod';
import { loginInputSchema } from '../../../shared/schemas/auth.ts';
import { Brand } from '../../app/brand.tsx';
import { Button } from '../../components/ui/button.tsx';
import { Banner, Spinner } from '../../components/ui/feedback.tsx';
import { TextField } from '../../components/ui/field.tsx';
import { applyApiFieldErrors } from '../../lib/form.ts';
import { useSignIn } from './api/sign-in.ts';
import { useAuth } from './use-auth.ts';

type FormIn = z.input<typeof loginInputSchema>;
type FormOut = z.output<typeof loginInputSchema>;

export function SignInPage() {
  const auth = useAuth();
  const location = useLocation();
  const navigate = useNavigate();
  const signIn = useSignIn();
  const [banner, setBanner] = useState<string | null>(null);
  const from = (location.state as { from?: string } | null)?.from;
  const next = from && from.startsWith('/') && !from.startsWith('/sign-in') ? from : '/';

  const form = useForm<FormIn, unknown, FormOut>({
    resolver: zodResolver(loginInputSchema),
    defaultValues: { email: '', password: '' },
  });
  const { errors } = form.formState;

  if (auth.status === 'loading') return <Spinner label="Checking your session…" />;
  if (auth.status === 'signed-in' && !signIn.isPending) return <Navigate to={next} replace />;

  const onSubmit = form.handleSubmit((values) => {
    setBanner(null);
    signIn.mutate(values, {
      onSuccess: () => navigate(next, { replace: true }),
      onError: (error) => {
        const message = applyApiFieldErrors(error, form.setError, ['email', 'password']);
        setBanner(message ?? error.message);
        if (error.status === 401) form.setError('password', { type: 'server', message: error.message });
        form.setValue('password', '');
        form.setFocus('password');
      },
    });
  });

  return (
    <div className="flex min-h-screen flex-col bg-paper lg:flex-row">
      <div className="flex items-center bg-slate-900 px-6 py-6 text-white lg:w-[26rem] lg:flex-col lg:items-start lg:justify-between lg:p-10">
        <Brand />
        <p className="ml-auto hidden max-w-xs text-lg text-slate-100 sm:block lg:ml-0">
          Plan, weigh and record calibration standards, with air-buoyancy correction and the uncertainty of every result.
        </p>
        <span aria-hidden="true" className="hidden lg:block" />
      </div>

      <main className="flex flex-1 items-start justify-center px-4 py-10 sm:items-center">
        <div className="w-full max-w-md">
          <h1 className="text-3xl font-bold tracking-tight">Sign in</h1>
          <p className="mt-1 text-ink-soft">Use the personal account your lab administrator set up for you.</p>

          <form noValidate onSubmit={onSubmit} className="mt-6 flex flex-col gap-5" aria-describedby={banner ? 'sign-in-banner' : undefined}>
            {banner ? (
              <div id="sign-in-banner">
                <Banner testId="sign-in-error" title="Could not sign in">
                  {banner}
                </Banner>
              </div>
            ) : null}
            <TextField
              label="Email address"
              type="email"
              autoComplete="username"
              inputMode="email"
              registration={form.register('email')}
              error={errors.email?.message}
            />
            <TextField
              label="Password"
              type="password"
              autoComplete="current-password"
              registration={form.register('password')}
              error={errors.password?.message}
            />
            <Button type="submit" busy={signIn.isPending} data-testid="sign-in-submit" className="w-full text-lg">
              Sign in
            </Button>
          </form>

          <div className="mt-8 rounded-lg border-2 border-line bg-card p-4 text-sm text-ink-soft">
            <p className="font-semibold text-ink">Good to know</p>
            <ul className="mt-1 list-disc space-y-1 pl-5">
              <li>Accounts are personal: never share a login, not even for a quick weighing.</li>
              <li>After several wrong passwords the account locks; an administrator can unlock it.</li>
              <li>Forgotten password? Ask your lab administrator to set a new one.</li>
            </ul>
          </div>
        </div>
      </main>
    </div>
  );
}
