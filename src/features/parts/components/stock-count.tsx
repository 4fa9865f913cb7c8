import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { stockCountInputSchema, type StockCountInput } from '../../../../shared/schemas/parts';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { serverErrors } from '../../../lib/form';
import { useCountStock, type CataloguePart } from '../api';

/** A stock count: what is on the shelf replaces the book stock; the difference is recorded (and audited). */
export function StockCount({ projectId, parts }: { projectId: string; parts: CataloguePart[] }) {
  const count = useCountStock(projectId);
  const [partId, setPartId] = useState(parts[0]?.id ?? '');
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const part = parts.find((p) => p.id === partId);
  // The part is where the count goes (the request's address); the form is the request body.
  const form = useForm<z.input<typeof stockCountInputSchema>, unknown, StockCountInput>({
    resolver: zodResolver(stockCountInputSchema),
    defaultValues: { note: '' },
  });
  const e = form.formState.errors;

  const onSubmit = form.handleSubmit(async (input) => {
    setMessage(null);
    try {
      const result = await count.mutateAsync({ partId, input });
      form.reset();
      setMessage({
        tone: 'success',
        text: `${part?.code}: ${result.onHand} on hand (${result.difference === 0 ? 'as on the books' : `${result.difference > 0 ? '+' : ''}${result.difference} recorded as a count`}).`,
      });
    } catch (err) {
      setMessage({ tone: 'error', text: serverErrors(err, form.setError, 'The count was not saved. Try again.').text });
    }
  });

  if (parts.length === 0) return null;
  return (
    <Panel title="Stock count">
      <form onSubmit={onSubmit} noValidate className="grid gap-4 md:grid-cols-[2fr_1fr_2fr_auto] md:items-start">
        {message && (
          <div className="md:col-span-4">
            <Alert tone={message.tone}>{message.text}</Alert>
          </div>
        )}
        <SelectField
          label="Part"
          value={partId}
          onChange={(e) => setPartId(e.target.value)}
          hint={part ? `${part.onHand} on the books` : undefined}
        >
          {parts.map((p) => (
            <option key={p.id} value={p.id}>
              {p.code} — {p.name}
            </option>
          ))}
        </SelectField>
        <TextField
          label="Counted quantity"
          inputMode="numeric"
          {...form.register('countedQty', {
            setValueAs: (v: unknown) => (v === '' || v == null ? undefined : typeof v === 'number' ? v : Number(String(v).trim())),
          })}
          error={e.countedQty?.message}
        />
        <TextField label="Note (optional)" {...form.register('note')} error={e.note?.message} />
        <div className="md:pt-8">
          <Button type="submit" disabled={form.formState.isSubmitting}>
            Record count
          </Button>
        </div>
      </form>
    </Panel>
  );
}
