import type { FieldPath, FieldValues, UseFormSetError } from 'react-hook-form';
import type { ApiIssue } from '../../shared/schemas/api-error';
import { ApiError } from './api-client';

/*
 * The one form pattern (DEVELOPERS.md, decision 31): `useForm` with `zodResolver(<the schema the
 * server parses with>)`, saved through the feature's mutation hook (`useMutation` in its api.ts,
 * invalidation in `onSuccess`), and the server's refusal shown through `serverErrors` below.
 */

/** What a form shows above its fields after the server refused: the message and every issue. */
export interface FormFailure {
  text: string;
  issues: ApiIssue[];
}

/**
 * How a form shows what the server refused: each issue with a path is set on that field
 * (`type: 'server'`, so the field shows it like its own check), and the message for the form as a
 * whole comes back for its Alert. Anything that is not an ApiError becomes `fallback`.
 */
export function serverErrors<T extends FieldValues>(err: unknown, setError: UseFormSetError<T>, fallback: string): FormFailure {
  if (!(err instanceof ApiError)) return { text: fallback, issues: [] };
  for (const issue of err.issues) if (issue.path) setError(issue.path as FieldPath<T>, { type: 'server', message: issue.message });
  return { text: err.message, issues: err.issues };
}
