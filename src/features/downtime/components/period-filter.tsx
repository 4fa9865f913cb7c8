import { useState, type FormEvent } from 'react';
import { useSearchParams } from 'react-router';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { periodFrom, type PeriodQuery } from '../api';

/** The period in the address (?from=&to=), so it survives a reload and follows the tabs. */
export function usePeriod(): PeriodQuery {
  const [params] = useSearchParams();
  return periodFrom(params);
}

/** From/to site days; `shown` is the period the server used (its default when none was asked for). */
export function PeriodFilter({ shown, timeZone }: { shown: { from: string; to: string }; timeZone: string }) {
  const [params, setParams] = useSearchParams();
  const [from, setFrom] = useState(shown.from);
  const [to, setTo] = useState(shown.to);
  const apply = (e: FormEvent) => {
    e.preventDefault();
    const next = new URLSearchParams(params);
    next.set('from', from);
    next.set('to', to);
    setParams(next);
  };
  return (
    <form onSubmit={apply} className="flex flex-wrap items-end gap-3" aria-label="Period">
      <TextField label="From" type="date" value={from} max={to} onChange={(e) => setFrom(e.target.value)} />
      <TextField label="To (included)" type="date" value={to} min={from} onChange={(e) => setTo(e.target.value)} />
      <Button type="submit" variant="secondary" disabled={!from || !to || from > to}>
        Show period
      </Button>
      <p className="text-caption text-basalt-700">Days and weeks in site time ({timeZone}); ISO weeks start on Monday.</p>
    </form>
  );
}
