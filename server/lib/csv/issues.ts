/** Problems found in an uploaded CSV file (`CsvIssue`, declared in shared/schemas), and the log that collects them while it is read. */
import type { CsvIssue } from '../../../shared/schemas/advance-log';

export const fileIssue = (message: string): CsvIssue => ({ row: 0, column: '', message });

/** Raised inside the reading pipeline to refuse the whole file. */
export class FileRefused extends Error {
  constructor(readonly issue: CsvIssue) {
    super(issue.message);
  }
}

/** Errors (all counted, the first `maxErrors` kept) and warnings (capped the same) of one file. */
export class IssueLog {
  readonly errors: CsvIssue[] = [];
  readonly warnings: CsvIssue[] = [];
  errorCount = 0;
  private readonly linesWithErrors = new Set<number>();

  constructor(private readonly maxErrors: number) {}

  error(issue: CsvIssue): void {
    this.errorCount += 1;
    this.linesWithErrors.add(issue.row);
    // A refusal of the whole file (row 0) is always kept, ahead of any row errors.
    if (issue.row === 0) this.errors.unshift(issue);
    else if (this.errors.length < this.maxErrors) this.errors.push(issue);
  }

  warning(issue: CsvIssue): void {
    if (this.warnings.length < this.maxErrors) this.warnings.push(issue);
  }

  hasError(line: number): boolean {
    return this.linesWithErrors.has(line);
  }
}
