import { useState } from 'react';
import { TextField } from '../../../components/ui/field';
import type { StoreCutter } from '../api';
import { Toggle } from './toggle';

const SHOWN = 8;

interface Props {
  /** Cutters in store that fit this position. */
  cutters: StoreCutter[];
  value: { serial: string; isNew: boolean } | null;
  onChange: (fitted: { serial: string; isNew: boolean } | null) => void;
  error?: string;
}

/** The cutter put on: picked from the store (searchable), or a new serial typed at the face. */
export function CutterPicker({ cutters, value, onChange, error }: Props) {
  const [search, setSearch] = useState('');
  const isNew = value?.isNew ?? false;
  const q = search.trim().toLowerCase();
  const matches = cutters.filter((c) => c.serial.toLowerCase().includes(q));
  return (
    <div className="space-y-3">
      <Toggle pressed={isNew} onToggle={() => onChange(isNew ? null : { serial: '', isNew: true })}>
        New serial, not yet in Kerfwise
      </Toggle>
      {isNew ? (
        <TextField
          label="Serial fitted (new)"
          value={value?.serial ?? ''}
          autoComplete="off"
          onChange={(e) => onChange({ serial: e.target.value.trim(), isNew: true })}
          error={error}
        />
      ) : (
        <div className="space-y-2">
          <TextField
            label="Serial fitted — search the store"
            type="search"
            autoComplete="off"
            value={search}
            onChange={(e) => setSearch(e.target.value)}
            // Enter in the search box narrows the list; it must not save the position.
            onKeyDown={(e) => e.key === 'Enter' && e.preventDefault()}
            error={error}
            hint={value ? `Picked: ${value.serial}` : `${cutters.length} in store for this position.`}
          />
          {matches.length === 0 ? (
            <p className="text-basalt-700">No cutter in store matches. Check the serial, or enter it as a new serial.</p>
          ) : (
            <ul aria-label="Cutters in store" className="grid gap-2 sm:grid-cols-2">
              {matches.slice(0, SHOWN).map((c) => (
                <li key={c.id}>
                  <Toggle
                    pressed={value?.serial === c.serial}
                    onToggle={() => onChange(value?.serial === c.serial ? null : { serial: c.serial, isNew: false })}
                  >
                    {c.serial}
                    <span className="block text-caption font-normal">
                      {c.discSizeIn}″ · rebuilt {c.rebuildCount}×
                    </span>
                  </Toggle>
                </li>
              ))}
            </ul>
          )}
          {matches.length > SHOWN && <p className="text-caption text-basalt-700">{matches.length - SHOWN} more — narrow the search.</p>}
        </div>
      )}
    </div>
  );
}
