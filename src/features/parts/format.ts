import type { DemandSource } from '../../../shared/schemas/parts';
import type { DemandStop } from './api';

/** Whole units as they are; expected (fractional) units with one decimal. */
export const units = (v: number) => (Math.abs(v - Math.round(v)) < 1e-9 ? String(Math.round(v)) : v.toFixed(1));

export const money = (v: number, currency: string) =>
  `${v.toLocaleString('en-GB', { minimumFractionDigits: 2, maximumFractionDigits: 2 })} ${currency}`;

/** Where demand comes from, in words: each stop by its label, then forecast changes and sudden failures. */
export function sourceLabel(source: DemandSource, stops: ReadonlyMap<string, DemandStop>): string {
  if (source.kind === 'stop') return stops.get(source.stopId ?? '')?.label ?? 'A stop';
  return source.kind === 'forecast' ? 'Positions due without a stop (forecast)' : 'Sudden failures (expected)';
}

export const sourcesText = (sources: readonly DemandSource[], stops: ReadonlyMap<string, DemandStop>) =>
  sources.map((s) => `${sourceLabel(s, stops)}: ${units(s.qty)}`).join('; ');
