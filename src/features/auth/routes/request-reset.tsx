import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link } from 'react-router';
import { passwordResetRequestSchema, type PasswordResetRequest } from '../../../../shared/schemas/auth';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { paths } from '../../../config/paths';
import { serverErrors } from '../../../lib/form';
import { useRequestPasswordReset } from '../api';
import { AuthCard } from '../components/auth-card';

export function RequestResetRoute() {
  const [done, setDone] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const requestReset = useRequestPasswordReset();
  const {
    register,
    handleSubmit,
    formState,
    setError: setFieldError,
  } = useForm<PasswordResetRequest>({ resolver: zodResolver(passwordResetRequestSchema) });
  const onSubmit = handleSubmit(async (input) => {
    setError(null);
    try {
      setDone((await requestReset.mutateAsync(input)).message);
    } catch (err) {
      setError(serverErrors(err, setFieldError, 'The request failed. Try again.').text);
    }
  });
  return (
    <AuthCard title="Reset your password">
      {done ? (
        <Alert tone="success">{done}</Alert>
      ) : (
        <form onSubmit={onSubmit} className="space-y-4" noValidate>
          {error && <Alert tone="error">{error}</Alert>}
          <p>Enter the e-mail address of your account. We send a link to choose a new password; it works once, within an hour.</p>
          <TextField label="E-mail" type="email" autoComplete="username" {...register('email')} error={formState.errors.email?.message} />
          <Button type="submit" className="w-full" disabled={formState.isSubmitting}>
            Send the link
          </Button>
        </form>
      )}
      <p className="text-center">
        <Link className="underline" to={paths.signIn}>
          Back to sign-in
        </Link>
      </p>
    </AuthCard>
  );
}
