/** What the reader needs to know about one kind of file (advance log, long section, layout). */
import type { z } from 'zod';
import type { ColumnSpec } from './columns';

export interface CsvLineRow<Row> {
  /** Line of the file the row starts on. */
  line: number;
  data: Row;
}

/** Reports a problem with a row's field by field name; the reader turns it into the column header. */
export interface RowReport<F extends string> {
  error(line: number, field: F, message: string): void;
  warning(line: number, field: F, message: string): void;
}

export interface TableSpec<F extends string, Row> extends ColumnSpec<F> {
  /** Checks one row after its cells were read (null for empty cells, unused columns as text in `extra`). */
  schema: z.ZodType<Row>;
  /**
   * Optional quick check: true only for a candidate `schema` accepts as it is (then the schema is
   * not run for that row); false sends the row to the schema, whose issues are reported.
   */
  isRow?: (candidate: Record<string, unknown>) => candidate is Record<string, unknown> & Row;
  /** Checks of one valid row that need the options or earlier rows, in file order. */
  checkRow(row: Row, line: number, report: RowReport<F>): void;
  /**
   * Checks between all rows without errors, once the file is read. `allRowsValid` is false when
   * some rows were left out for errors of their own: gaps are then not worth a warning.
   */
  finish(rows: readonly CsvLineRow<Row>[], report: RowReport<F>, allRowsValid: boolean): void;
}

/** Rounds chainage for messages (mm). */
export const m = (chainageM: number) => String(Math.round(chainageM * 1000) / 1000);
