import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { signInInputSchema, type SignInInput } from '../../../../shared/schemas/auth';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { paths } from '../../../config/paths';
import { serverErrors } from '../../../lib/form';
import { useSignIn } from '../api';
import { AuthCard } from '../components/auth-card';

export function SignInRoute() {
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const signIn = useSignIn();
  const [error, setError] = useState<string | null>(null);
  const { register, handleSubmit, formState, setError: setFieldError } = useForm<SignInInput>({ resolver: zodResolver(signInInputSchema) });

  const onSubmit = handleSubmit(async (input) => {
    setError(null);
    try {
      await signIn.mutateAsync(input); // drops the cached "nobody signed in"
      const next = params.get('next');
      navigate(next && next.startsWith('/') && !next.startsWith('//') ? next : paths.home, { replace: true });
    } catch (err) {
      setError(serverErrors(err, setFieldError, 'Sign-in failed. Try again.').text);
    }
  });

  return (
    <AuthCard title="Sign in">
      <form onSubmit={onSubmit} className="space-y-4" noValidate>
        {error && <Alert tone="error">{error}</Alert>}
        <TextField
          label="E-mail"
          type="email"
          autoComplete="username"
          autoFocus
          {...register('email')}
          error={formState.errors.email?.message}
        />
        <TextField
          label="Password"
          type="password"
          autoComplete="current-password"
          {...register('password')}
          error={formState.errors.password?.message}
        />
        <Button type="submit" className="w-full" disabled={formState.isSubmitting}>
          {formState.isSubmitting ? 'Signing in…' : 'Sign in'}
        </Button>
        <p className="text-center">
          <Link className="underline" to={paths.requestReset}>
            Forgot your password?
          </Link>
        </p>
      </form>
    </AuthCard>
  );
}
