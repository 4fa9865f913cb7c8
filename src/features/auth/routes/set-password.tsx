import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { z } from 'zod';
import { newPasswordSchema } from '../../../../shared/schemas/password';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { paths } from '../../../config/paths';
import { serverErrors } from '../../../lib/form';
import { useSetPassword } from '../api';
import { AuthCard } from '../components/auth-card';

const formSchema = z
  .object({ password: newPasswordSchema, repeat: z.string() })
  .refine((v) => v.password === v.repeat, { path: ['repeat'], message: 'The two passwords are not the same.' });
type FormValues = z.infer<typeof formSchema>;

/** Where both the password-reset link and the invitation link land. */
export function SetPasswordRoute() {
  const [params] = useSearchParams();
  const token = params.get('token') ?? '';
  const navigate = useNavigate();
  const save = useSetPassword();
  const [error, setError] = useState<string | null>(null);
  const { register, handleSubmit, formState, setError: setFieldError } = useForm<FormValues>({ resolver: zodResolver(formSchema) });
  const onSubmit = handleSubmit(async ({ password }) => {
    setError(null);
    try {
      await save.mutateAsync({ token, password }); // drops the cached "nobody signed in"
      navigate(paths.home, { replace: true });
    } catch (err) {
      setError(serverErrors(err, setFieldError, 'Setting the password failed. Try again.').text);
    }
  });
  return (
    <AuthCard title="Choose a password">
      {!token ? (
        <Alert tone="error">This page needs the link from your e-mail. Open the link again, or ask for a new one.</Alert>
      ) : (
        <form onSubmit={onSubmit} className="space-y-4" noValidate>
          {error && <Alert tone="error">{error}</Alert>}
          <TextField
            label="New password"
            type="password"
            autoComplete="new-password"
            hint="At least 12 characters. A few words in a row make a good one."
            {...register('password')}
            error={formState.errors.password?.message}
          />
          <TextField
            label="New password again"
            type="password"
            autoComplete="new-password"
            {...register('repeat')}
            error={formState.errors.repeat?.message}
          />
          <Button type="submit" className="w-full" disabled={formState.isSubmitting}>
            Save password and sign in
          </Button>
        </form>
      )}
      <p className="text-center">
        <Link className="underline" to={paths.requestReset}>
          Ask for a new link
        </Link>
      </p>
    </AuthCard>
  );
}
