import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { useSearchParams } from 'react-router';
import type { z } from 'zod';
import { downtimePeriodQuerySchema } from '../../../../shared/schemas/downtime';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { periodFrom, type PeriodQuery } from '../api';

/** An empty date is "not given" (the server then picks its default period). */
export const dayOrNothing = { setValueAs: (v: unknown) => (v === '' || v == null ? undefined : String(v)) };

/** The period in the address (?from=&to=), so it survives a reload and follows the tabs. */
export function usePeriod(): PeriodQuery {
  const [params] = useSearchParams();
  return periodFrom(params);
}

/** From/to site days; `shown` is the period the server used (its default when none was asked for). */
export function PeriodFilter({ shown, timeZone }: { shown: { from: string; to: string }; timeZone: string }) {
  const [params, setParams] = useSearchParams();
  const form = useForm<z.input<typeof downtimePeriodQuerySchema>, unknown, PeriodQuery>({
    resolver: zodResolver(downtimePeriodQuerySchema),
    defaultValues: shown,
  });
  const [from, to] = form.watch(['from', 'to']);
  const e = form.formState.errors;
  const apply = form.handleSubmit((period) => {
    const next = new URLSearchParams(params);
    next.set('from', period.from ?? '');
    next.set('to', period.to ?? '');
    setParams(next);
  });
  return (
    <form onSubmit={apply} noValidate className="flex flex-wrap items-end gap-3" aria-label="Period">
      <TextField label="From" type="date" max={to} {...form.register('from', dayOrNothing)} error={e.from?.message} />
      <TextField label="To (included)" type="date" min={from} {...form.register('to', dayOrNothing)} error={e.to?.message} />
      <Button type="submit" variant="secondary" disabled={!from || !to || from > to}>
        Show period
      </Button>
      <p className="text-caption text-basalt-700">Days and weeks in site time ({timeZone}); ISO weeks start on Monday.</p>
    </form>
  );
}
