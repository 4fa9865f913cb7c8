import { useState, type FormEvent } from 'react';
import { stockCountInputSchema } from '../../../../shared/schemas/parts';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { useCountStock, type CataloguePart } from '../api';

/** A stock count: what is on the shelf replaces the book stock; the difference is recorded (and audited). */
export function StockCount({ projectId, parts }: { projectId: string; parts: CataloguePart[] }) {
  const count = useCountStock(projectId);
  const [partId, setPartId] = useState(parts[0]?.id ?? '');
  const [counted, setCounted] = useState('');
  const [note, setNote] = useState('');
  const [error, setError] = useState<string | undefined>();
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const part = parts.find((p) => p.id === partId);

  const onSubmit = async (e: FormEvent) => {
    e.preventDefault();
    setMessage(null);
    const parsed = stockCountInputSchema.safeParse({ countedQty: counted.trim() === '' ? undefined : Number(counted), note });
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message);
      return;
    }
    setError(undefined);
    try {
      const result = await count.mutateAsync({ partId, input: parsed.data });
      setCounted('');
      setNote('');
      setMessage({
        tone: 'success',
        text: `${part?.code}: ${result.onHand} on hand (${result.difference === 0 ? 'as on the books' : `${result.difference > 0 ? '+' : ''}${result.difference} recorded as a count`}).`,
      });
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'The count was not saved. Try again.' });
    }
  };

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
          value={counted}
          onChange={(e) => setCounted(e.target.value)}
          error={error}
        />
        <TextField label="Note (optional)" value={note} onChange={(e) => setNote(e.target.value)} />
        <div className="md:pt-8">
          <Button type="submit">Record count</Button>
        </div>
      </form>
    </Panel>
  );
}
