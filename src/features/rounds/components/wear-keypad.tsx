import { useEffect, useId, useRef, type ReactNode, type Ref } from 'react';
import { Toggle } from './toggle';

/** Wear as the fitter enters it: up to three digits, a point and one decimal. */
const wearText = /^\d{0,3}(\.\d?)?$/;
const dropLeadingZeros = (t: string) => t.replace(/^0+(?=\d)/, '');

/** The wear text after one keypad key ('0'–'9', '.', 'back'); a key that would break the form is ignored. */
export function pressWearKey(text: string, key: string): string {
  if (key === 'back') return text.slice(0, -1);
  const next = key === '.' && text === '' ? '0.' : text + key;
  return wearText.test(next) ? dropLeadingZeros(next) : text;
}

/** The wear text after typing into the field (a comma is read as the decimal point); bad input keeps the old text. */
export function typeWearText(raw: string, previous: string): string {
  const next = raw.replace(',', '.').replace(/\s+/g, '');
  return wearText.test(next) ? dropLeadingZeros(next) : previous;
}

const keys: { key: string; label: ReactNode; name: string }[] = [
  ...['7', '8', '9', '4', '5', '6', '1', '2', '3'].map((d) => ({ key: d, label: d, name: d })),
  { key: '.', label: '.', name: 'Decimal point' },
  { key: '0', label: '0', name: '0' },
  { key: 'back', label: '⌫', name: 'Delete last digit' },
];

interface Props {
  text: string;
  notMeasured: boolean;
  onChange: (patch: { wearText?: string; notMeasured?: boolean }) => void;
  error?: string;
  disabled?: boolean;
  /** Also given the input (e.g. a form library's ref, to focus the field that needs attention). */
  inputRef?: Ref<HTMLInputElement>;
  /** Under the keypad: e.g. the "confirm as re-measured" choice. */
  children?: ReactNode;
}

/** Radial wear in mm with one decimal: a large readout, an on-screen keypad for gloved hands, and "not measured". */
export function WearKeypad({ text, notMeasured, onChange, error, disabled, inputRef, children }: Props) {
  const id = useId();
  const input = useRef<HTMLInputElement>(null);
  // When the previous position's form went away with the focus in it, keyboard users continue here.
  useEffect(() => {
    if (document.activeElement === document.body) input.current?.focus({ preventScroll: true });
  }, []);
  const press = (key: string) => onChange({ wearText: pressWearKey(notMeasured ? '' : text, key), notMeasured: false });
  return (
    <fieldset disabled={disabled} className="space-y-2">
      <legend className="mb-1 text-lead font-semibold">
        <label htmlFor={id}>Radial wear (mm)</label>
      </legend>
      <div
        className={`flex items-center rounded-md border-[3px] bg-white px-3 focus-within:border-ember-500 ${error ? 'border-alarm-500' : 'border-basalt-700'}`}
      >
        <input
          ref={(el) => {
            input.current = el;
            if (typeof inputRef === 'function') inputRef(el);
            else if (inputRef) inputRef.current = el;
          }}
          id={id}
          // The keypad below replaces the system keyboard on a tablet; a hardware keyboard types directly.
          inputMode="none"
          autoComplete="off"
          value={notMeasured ? '' : text}
          placeholder={notMeasured ? 'not measured' : '—'}
          onChange={(e) => onChange({ wearText: typeWearText(e.target.value, text), notMeasured: false })}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${id}-error` : undefined}
          className="min-h-14 w-full min-w-0 bg-transparent text-right text-display tabular-nums outline-none placeholder:text-lead placeholder:text-basalt-500"
        />
        <span aria-hidden="true" className="pl-2 text-lead text-basalt-600">
          mm
        </span>
      </div>
      {error && (
        <p id={`${id}-error`} className="font-semibold text-alarm-700">
          {error}
        </p>
      )}
      <div role="group" aria-label="Wear keypad" className="grid grid-cols-3 gap-2">
        {keys.map((k) => (
          <button
            key={k.key}
            type="button"
            aria-label={k.name}
            onClick={() => press(k.key)}
            className="min-h-14 rounded-md border-2 border-basalt-400 bg-basalt-100 text-title font-bold text-basalt-900 hover:bg-basalt-200 active:bg-basalt-300 disabled:text-basalt-400"
          >
            {k.label}
          </button>
        ))}
      </div>
      <Toggle pressed={notMeasured} onToggle={() => onChange({ notMeasured: !notMeasured })} className="text-lead">
        Not measured
      </Toggle>
      {children}
    </fieldset>
  );
}
