import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { changePasswordInputSchema, type ChangePasswordInput } from '../../../../shared/schemas/password';
import { roleLabels } from '../../../../shared/roles';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { serverErrors } from '../../../lib/form';
import { useChangePassword } from '../api';
import { NotificationChoices } from '../components/notification-choices';
import { useMe } from '../use-me';

export function AccountRoute() {
  const me = useMe();
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const changePassword = useChangePassword();
  const { register, handleSubmit, formState, reset, setError } = useForm<ChangePasswordInput>({
    resolver: zodResolver(changePasswordInputSchema),
  });
  const onSubmit = handleSubmit(async (input) => {
    setMessage(null);
    try {
      await changePassword.mutateAsync(input);
      reset();
      setMessage({ tone: 'success', text: 'Password changed. You were signed out everywhere else.' });
    } catch (err) {
      setMessage({ tone: 'error', text: serverErrors(err, setError, 'The change failed. Try again.').text });
    }
  });
  return (
    <Page title="Your account">
      <Panel title={me.user.name}>
        <p>
          {me.user.email}
          {me.user.isAdmin && ' · administrator'}
        </p>
        <ul className="mt-2 list-disc pl-6">
          {me.memberships.map((m) => (
            <li key={m.projectId}>
              {m.projectName}: {roleLabels[m.role]}
            </li>
          ))}
        </ul>
      </Panel>
      <Panel title="E-mail notifications">
        <NotificationChoices />
      </Panel>
      <Panel title="Change password">
        <form onSubmit={onSubmit} className="max-w-md space-y-4" noValidate>
          {message && <Alert tone={message.tone}>{message.text}</Alert>}
          <TextField
            label="Current password"
            type="password"
            autoComplete="current-password"
            {...register('currentPassword')}
            error={formState.errors.currentPassword?.message}
          />
          <TextField
            label="New password"
            type="password"
            autoComplete="new-password"
            {...register('newPassword')}
            error={formState.errors.newPassword?.message}
          />
          <Button type="submit" disabled={formState.isSubmitting}>
            Change password
          </Button>
        </form>
      </Panel>
    </Page>
  );
}
