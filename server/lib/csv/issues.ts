/** Problems found in an uploaded CSV file, and the log that collects them while it is read. */

/**
 * A problem in a file. `row` is the 1-based line of the file (the header is line 1; a row that
 * spans lines inside quotes has the line it starts on), 0 for the file as a whole. `column` is
 * the header as written in the file, the field's label when the file has no such column, '' for
 * a whole row or file.
 */
export interface CsvIssue {
  row: number;
  column: string;
  message: string;
}

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
