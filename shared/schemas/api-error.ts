import { z } from 'zod';

/** One problem with the input; file imports add the row and column it is in. */
export const apiIssueSchema = z.object({
  path: z.string(),
  message: z.string(),
  row: z.number().int().optional(),
  column: z.string().optional(),
});
export type ApiIssue = z.infer<typeof apiIssueSchema>;

/** Every error the server answers: a message a person can act on, the issues, and extra details (e.g. what an import detected). */
export interface ApiErrorBody {
  error: { message: string; issues: ApiIssue[] } & Record<string, unknown>;
}
