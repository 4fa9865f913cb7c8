/**
 * The cutterhead layout: one row per position. Rules between rows that need the drive (numbers
 * unique, radius inside the bore) are checked when the layout is saved (server/routes/positions.ts),
 * with the same row numbers.
 */
import type { Readable } from 'node:stream';
import { z } from 'zod';
import { layoutFields, layoutRequiredColumns, type LayoutField } from '../../../shared/csv-headers';
import { positionInputSchema, type PositionInput } from '../../../shared/schemas/cutterhead';
import { readCsv, type CsvImportResult, type CsvReadOptions } from './read';
import type { TableSpec } from './table';

/** Empty cells take the form's defaults (no tilt, no angle, not a twin disc); the class is read in any case. */
const layoutRowSchema = z.preprocess((raw) => {
  const { extra: _extra, ...cells } = raw as Record<string, unknown>;
  const row: Record<string, unknown> = {};
  for (const [field, value] of Object.entries(cells)) {
    if (value === null) row[field] = field === 'tiltDeg' || field === 'angleDeg' ? null : undefined;
    else row[field] = field === 'positionClass' && typeof value === 'string' ? value.toLowerCase() : value;
  }
  return row;
}, positionInputSchema) as unknown as z.ZodType<PositionInput>;

export function layoutTable(): TableSpec<LayoutField, PositionInput> {
  return {
    fields: layoutFields,
    requiredColumns: layoutRequiredColumns,
    schema: layoutRowSchema,
    checkRow: () => undefined,
    finish: () => undefined,
  };
}

/** Reads and checks a cutterhead layout (track radius and wear limit in mm, disc size in inches) from a CSV byte stream. */
export function readLayoutCsv(
  source: Readable,
  options: CsvReadOptions<LayoutField> = {},
): Promise<CsvImportResult<PositionInput, LayoutField>> {
  return readCsv(source, options, layoutTable());
}
