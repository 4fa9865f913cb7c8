import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useId, useRef, useState, type ReactNode } from 'react';
import { Controller, useController, useForm, type FieldPath } from 'react-hook-form';
import { discConditions, positionClassLabels } from '../../../../shared/cutters';
import { entryInputSchema } from '../../../../shared/schemas/inspection';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { ApiError } from '../../../lib/api-client';
import { serverErrors } from '../../../lib/form';
import { photoUrl, useRecordEntry, type RoundEntry, type RoundPosition, type StoreCutter } from '../api';
import { entryFormSchema, isDraftField, type Draft, type EntryValues } from '../entry-draft';
import { formatSiteDateTime } from '../../../../shared/site-time';
import { discardItem, type QueuedEntry } from '../../../lib/outbox';
import { CutterPicker } from './cutter-picker';
import { overLimitBadge, OverLimitMark } from './marks';
import { Toggle } from './toggle';
import { WearKeypad } from './wear-keypad';

export { draftFrom, type Draft } from '../entry-draft';

const quickReasons = ['Worn to the limit', 'Ring damaged', 'Blocked disc', 'Bearing or seal', 'Planned change'];

interface Props {
  projectId: string;
  roundId: string;
  timeZone: string;
  position: RoundPosition;
  stored: RoundEntry | undefined;
  queued: QueuedEntry | undefined;
  waitingPhotos: number;
  storeCutters: StoreCutter[];
  /** What the screen starts from: the fitter's unsaved changes (`edited`), else the queued or stored entry. */
  draft: Draft;
  edited: boolean;
  /** Every change the fitter makes, so it is kept while they look at other positions. */
  onDraft: (draft: Draft) => void;
  readOnly: boolean;
  /** After a save: stored, waiting for the network, or refused by the server (then the fitter stays here). */
  onSaved: (refused: boolean) => void;
  onPrev: (() => void) | null;
  onNext: (() => void) | null;
  prevNumber?: number;
  nextNumber?: number;
  status: ReactNode;
}

/** The first message in a field's error, nested ones included (`fitted.serial`, `conditions.0`). */
function firstMessage(error: unknown): string | undefined {
  if (!error || typeof error !== 'object') return undefined;
  const { message, ref: _ref, type: _type, types: _types, ...nested } = error as Record<string, unknown>;
  if (typeof message === 'string' && message) return message;
  for (const inner of Object.values(nested)) {
    const m = firstMessage(inner);
    if (m) return m;
  }
  return undefined;
}

/** A draft compared by its values (photos by count: a saved draft's photos have gone to the outbox). */
const draftKey = (d: Draft) => JSON.stringify({ ...d, photos: d.photos.length });

/**
 * One position of the round: what the fitter found and did, saved the moment "Save position" is
 * pressed. A react-hook-form form on the server's own entry rules (`entryFormSchema`); the save goes
 * to the app's outbox through `useRecordEntry`, and a refusal — now, or later from the outbox —
 * shows each issue beside its field.
 */
export function EntryForm(props: Props) {
  const { projectId, roundId, timeZone, position, stored, queued, draft, edited, readOnly } = props;
  const formId = useId();
  const headerRef = useRef<HTMLElement>(null);
  const mounted = useRef(false);
  useEffect(() => {
    mounted.current = true;
    return () => {
      mounted.current = false;
    };
  }, []);
  // Coming from the bottom of the previous position: bring this one's header into view.
  useEffect(() => {
    const header = headerRef.current;
    if (header && header.getBoundingClientRect().top < 0) header.scrollIntoView({ block: 'start' });
  }, []);

  const record = useRecordEntry(projectId, roundId);
  const form = useForm<Draft, unknown, EntryValues>({ resolver: zodResolver(entryFormSchema), defaultValues: draft });
  const { control, formState } = form;
  const fieldError = (name: keyof Draft) => firstMessage(formState.errors[name]);
  /** A problem that belongs to no field (the device could not keep the entry), shown at the top. */
  const [failure, setFailure] = useState<string | null>(null);
  const saving = record.isPending;
  const refused = queued?.state === 'attention' ? queued.error : undefined;
  const wearFell = refused?.status === 409 && refused.issues.some((i) => i.path === 'wearMm');
  const changeLocked = !queued && stored?.action === 'changed';

  // The fitter's own changes (events carry a type; a reset does not) go to the round screen.
  const onDraft = useRef(props.onDraft);
  onDraft.current = props.onDraft;
  useEffect(() => {
    const sub = form.watch((values, { type }) => {
      if (type) {
        setFailure(null);
        onDraft.current(values as Draft);
      }
    });
    return () => sub.unsubscribe();
  }, [form]);

  // Not edited here: the screen follows what the outbox and the server hold (after a save, a refusal, a refetch),
  // keeping a refusal's errors and re-checking each field as it is changed, as after any submit.
  const incoming = draftKey(draft);
  useEffect(() => {
    if (!edited && draftKey(form.getValues()) !== incoming) form.reset(draft, { keepErrors: true, keepIsSubmitted: true });
    // eslint-disable-next-line react-hooks/exhaustive-deps -- `incoming` stands for `draft`
  }, [incoming, edited, form]);

  // A refusal held by the outbox (answered now, or later while the fitter was elsewhere, or before a reload): beside its fields.
  const refusal = refused && queued ? `${queued.key}:${JSON.stringify(refused)}` : '';
  useEffect(() => {
    if (!refused) return;
    for (const issue of refused.issues)
      if (isDraftField(issue.path)) form.setError(issue.path as FieldPath<Draft>, { type: 'server', message: issue.message });
    // eslint-disable-next-line react-hooks/exhaustive-deps -- `refusal` stands for `refused`
  }, [refusal, form]);

  const save = (remeasured: boolean) =>
    form.handleSubmit(async (values) => {
      setFailure(null);
      try {
        const body = entryInputSchema.parse({
          ...values,
          // A refused entry is fixed under its own key: the server never stored it, and its photos point to it.
          clientKey: refused ? queued!.key : crypto.randomUUID(),
          positionId: position.id,
          remeasured,
          recordedAt: new Date().toISOString(),
        });
        await record.mutateAsync({
          positionId: position.id,
          body,
          photos: form.getValues('photos'),
          replacing: refused ? queued : undefined,
        });
      } catch (err) {
        if (!(err instanceof ApiError)) {
          setFailure(
            `This device could not keep the entry (${err instanceof Error ? err.message : 'storage failed'}). Nothing was saved; try again.`,
          );
          return;
        }
        // Refused: the entry stays queued with the server's words; each issue goes beside its field.
        serverErrors(err, form.setError, err.message);
        if (mounted.current) props.onSaved(true);
        return;
      }
      // The fitter may have moved on while the answer was awaited; then there is nothing to move from.
      if (mounted.current) props.onSaved(false);
    });

  const wear = useController({ control, name: 'wearMm' });
  // "Not measured" answers the wear field's "enter the wear" check, so it re-checks that field.
  const notMeasured = useController({ control, name: 'notMeasured', rules: { deps: ['wearMm'] } });
  const action = form.watch('action');
  const fitted = form.watch('fitted');
  const changeReason = form.watch('changeReason');

  const lastOver = position.lastWearMm != null && position.lastWearMm >= position.wearLimitMm;
  const fittingCutters = props.storeCutters.filter((c) => c.discSizeIn === position.discSizeIn);
  const unplaced = refused?.issues.filter((i) => !isDraftField(i.path)) ?? [];

  return (
    <>
      <form
        id={formId}
        onSubmit={(e) => {
          if (readOnly || saving) e.preventDefault();
          else void save(false)(e);
        }}
        noValidate
        className="space-y-5"
      >
        <header ref={headerRef} className="scroll-mt-2 rounded-lg border-2 border-basalt-800 bg-white px-4 py-2">
          <div className="flex flex-wrap items-baseline gap-x-4">
            <h2 className="text-display">Position {position.number}</h2>
            <p className="text-lead">
              {positionClassLabels[position.positionClass]} · {position.discSizeIn}″ disc{position.twinDisc ? ' (twin)' : ''} · radius{' '}
              {position.trackRadiusMm.toLocaleString('en-GB')} mm
              {position.tiltDeg != null && ` · tilt ${position.tiltDeg}°`}
            </p>
          </div>
          <dl className="flex flex-wrap gap-x-6 text-lead">
            <div className="flex gap-2">
              <dt className="text-basalt-700">Limit</dt>
              <dd className="font-semibold">{position.wearLimitMm.toFixed(1)} mm</dd>
            </div>
            <div className="flex gap-2">
              <dt className="text-basalt-700">Serial now</dt>
              <dd className="font-semibold">{position.current ? position.current.serial : 'none recorded'}</dd>
            </div>
            <div className="flex flex-wrap items-center gap-x-2">
              <dt className="text-basalt-700">Last wear</dt>
              <dd className="font-semibold">{position.lastWearMm != null ? `${position.lastWearMm.toFixed(1)} mm` : 'not measured yet'}</dd>
              {position.lastMeasuredAt && (
                <dd className="text-caption text-basalt-700">{formatSiteDateTime(position.lastMeasuredAt, timeZone)}</dd>
              )}
              {lastOver && (
                <dd className={`inline-flex items-center gap-1 rounded px-2 text-caption font-semibold ${overLimitBadge}`}>
                  <OverLimitMark className="h-3 w-3" /> over limit
                </dd>
              )}
            </div>
          </dl>
        </header>

        {refused && (
          <Alert tone="error" title="The server did not store this position">
            <p>{refused.message}</p>
            {unplaced.map((i) => (
              <p key={`${i.path}:${i.message}`} className="mt-1">
                {i.message}
              </p>
            ))}
            {!wearFell && <p className="mt-1">Fix the values and press “Save position” again, or discard the entry.</p>}
            {!readOnly && queued && (
              <Button
                variant="secondary"
                className="mt-2"
                onClick={() => {
                  if (window.confirm(`Discard what was entered for position ${position.number}? It will not be stored.`))
                    void discardItem(queued);
                }}
              >
                Discard this entry
              </Button>
            )}
          </Alert>
        )}
        {failure && <Alert tone="error">{failure}</Alert>}

        <fieldset disabled={readOnly || saving} className="grid gap-6 md:grid-cols-2">
          <WearKeypad
            text={wear.field.value}
            notMeasured={notMeasured.field.value}
            inputRef={wear.field.ref}
            onChange={(patch) => {
              if (patch.wearText !== undefined) wear.field.onChange(patch.wearText);
              if (patch.notMeasured !== undefined) notMeasured.field.onChange(patch.notMeasured);
            }}
            error={fieldError('wearMm') ?? fieldError('notMeasured')}
          >
            {wearFell && (
              <Button variant="danger" className="min-h-14 w-full text-lead" onClick={() => void save(true)()}>
                Confirm as re-measured
              </Button>
            )}
          </WearKeypad>

          <Controller
            control={control}
            name="conditions"
            render={({ field }) => (
              <fieldset className="space-y-2">
                <legend className="mb-2 text-lead font-semibold">
                  Condition <span className="text-body font-normal text-basalt-700">(all that apply)</span>
                </legend>
                <div className="grid grid-cols-2 gap-2 md:grid-cols-1 lg:grid-cols-2">
                  {discConditions.map((c) => (
                    <Toggle
                      key={c.key}
                      pressed={field.value.includes(c.key)}
                      onToggle={() =>
                        field.onChange(field.value.includes(c.key) ? field.value.filter((k) => k !== c.key) : [...field.value, c.key])
                      }
                    >
                      {c.label}
                      {c.needsChange && <span className="block text-caption font-normal">calls for a change</span>}
                    </Toggle>
                  ))}
                </div>
                {fieldError('conditions') && <p className="font-semibold text-alarm-700">{fieldError('conditions')}</p>}
              </fieldset>
            )}
          />
        </fieldset>

        <fieldset disabled={readOnly || saving} className="space-y-3 rounded-lg border-2 border-basalt-300 bg-white p-4">
          <legend className="px-1 text-lead font-semibold">Action</legend>
          {changeLocked ? (
            <p>
              Cutter changed in this round: <strong>{fitted?.serial}</strong> fitted. Reason: {changeReason}. A recorded change is corrected
              by the planner, not here.
            </p>
          ) : (
            <>
              <Controller
                control={control}
                name="action"
                render={({ field }) => (
                  <div role="group" aria-label="Action" className="grid grid-cols-2 gap-2">
                    <Toggle pressed={field.value === 'none'} onToggle={() => field.onChange('none')}>
                      No change
                    </Toggle>
                    <Toggle pressed={field.value === 'changed'} onToggle={() => field.onChange('changed')}>
                      Cutter changed
                    </Toggle>
                  </div>
                )}
              />
              {action === 'changed' && (
                <div className="grid gap-4 md:grid-cols-2">
                  <Controller
                    control={control}
                    name="removedSerial"
                    render={({ field }) => (
                      <TextField
                        label="Serial removed"
                        ref={field.ref}
                        name={field.name}
                        value={field.value}
                        autoComplete="off"
                        onChange={(e) => field.onChange(e.target.value)}
                        onBlur={field.onBlur}
                        error={fieldError('removedSerial')}
                        hint={
                          position.current
                            ? `Kerfwise has ${position.current.serial} here.`
                            : 'Kerfwise has no cutter here; leave empty if none was on.'
                        }
                      />
                    )}
                  />
                  <Controller
                    control={control}
                    name="changeReason"
                    render={({ field }) => (
                      <div className="space-y-2">
                        <TextField
                          label="Reason for the change"
                          ref={field.ref}
                          name={field.name}
                          value={field.value}
                          onChange={(e) => field.onChange(e.target.value)}
                          onBlur={field.onBlur}
                          error={fieldError('changeReason')}
                        />
                        <div className="flex flex-wrap gap-2">
                          {quickReasons.map((r) => (
                            <button
                              key={r}
                              type="button"
                              onClick={() => field.onChange(r)}
                              className="min-h-touch rounded-md border-2 border-basalt-300 bg-basalt-50 px-3 font-semibold"
                            >
                              {r}
                            </button>
                          ))}
                        </div>
                      </div>
                    )}
                  />
                  <div className="md:col-span-2">
                    <Controller
                      control={control}
                      name="fitted"
                      render={({ field }) => (
                        <CutterPicker cutters={fittingCutters} value={field.value} onChange={field.onChange} error={fieldError('fitted')} />
                      )}
                    />
                  </div>
                </div>
              )}
            </>
          )}
        </fieldset>

        <fieldset disabled={readOnly || saving} className="grid gap-6 md:grid-cols-2">
          <Controller
            control={control}
            name="note"
            render={({ field }) => <NoteField value={field.value} onChange={field.onChange} error={fieldError('note')} />}
          />
          <Controller
            control={control}
            name="photos"
            render={({ field }) => (
              <Photos
                projectId={projectId}
                files={field.value}
                storedIds={stored?.photoIds ?? []}
                waiting={props.waitingPhotos}
                onFiles={field.onChange}
                error={fieldError('photos')}
              />
            )}
          />
        </fieldset>
      </form>

      <div className="no-print fixed inset-x-0 bottom-0 z-20 border-t-4 border-basalt-900 bg-white pb-[env(safe-area-inset-bottom)] shadow-[0_-4px_12px_rgba(0,0,0,0.15)]">
        <div className="mx-auto max-w-6xl space-y-2 px-3 py-2">
          {props.status}
          <div className={`grid gap-2 ${readOnly ? 'grid-cols-2' : 'grid-cols-[1fr_1.6fr_1fr]'}`}>
            <NavButton onClick={props.onPrev} label="Previous" number={props.prevNumber} direction="prev" />
            {!readOnly && (
              <button
                type="submit"
                form={formId}
                disabled={saving}
                className="min-h-16 rounded-md bg-ember-600 px-3 text-lead font-bold text-white hover:bg-ember-700 disabled:bg-basalt-400"
              >
                {saving ? 'Saving…' : 'Save position'}
              </button>
            )}
            <NavButton onClick={props.onNext} label="Next" number={props.nextNumber} direction="next" />
          </div>
        </div>
      </div>
    </>
  );
}

function NavButton({
  onClick,
  label,
  number,
  direction,
}: {
  onClick: (() => void) | null;
  label: string;
  number?: number;
  direction: 'prev' | 'next';
}) {
  const arrow = (
    <svg
      viewBox="0 0 16 16"
      aria-hidden="true"
      className="h-5 w-5 shrink-0"
      fill="none"
      stroke="currentColor"
      strokeWidth={3}
      strokeLinecap="round"
      strokeLinejoin="round"
    >
      <path d={direction === 'prev' ? 'M10 3L5 8l5 5' : 'M6 3l5 5-5 5'} />
    </svg>
  );
  return (
    <button
      type="button"
      onClick={onClick ?? undefined}
      disabled={!onClick}
      className={`flex min-h-16 items-center justify-center gap-1 rounded-md border-[3px] border-basalt-900 bg-white px-2 text-lead font-bold text-basalt-900 hover:bg-basalt-100 disabled:border-basalt-300 disabled:text-basalt-400 ${direction === 'next' ? 'flex-row-reverse' : ''}`}
    >
      {arrow}
      {/* The accessible name is the visible text ("Next 4"); on a phone the word is read out but not shown. */}
      <span className="sr-only sm:not-sr-only">{label}</span>
      {number != null && <span className="tabular-nums"> {number}</span>}
    </button>
  );
}

function NoteField({ value, onChange, error }: { value: string; onChange: (v: string) => void; error?: string }) {
  const id = useId();
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-lead font-semibold">
        Note
      </label>
      <textarea
        id={id}
        rows={4}
        value={value}
        maxLength={2000}
        onChange={(e) => onChange(e.target.value)}
        aria-invalid={error ? true : undefined}
        className="block w-full rounded-md border-2 border-basalt-400 bg-white p-3 focus:border-ember-500 aria-[invalid=true]:border-alarm-500"
      />
      {error && <p className="font-semibold text-alarm-700">{error}</p>}
    </div>
  );
}

interface PhotosProps {
  projectId: string;
  files: File[];
  storedIds: string[];
  waiting: number;
  onFiles: (files: File[]) => void;
  error?: string;
}

function Photos({ projectId, files, storedIds, waiting, onFiles, error }: PhotosProps) {
  const id = useId();
  return (
    <div className="space-y-2">
      <p className="text-lead font-semibold">Photos</p>
      <label
        htmlFor={id}
        className="flex min-h-14 cursor-pointer items-center justify-center rounded-md border-[3px] border-dashed border-basalt-700 bg-white px-3 text-lead font-semibold focus-within:outline focus-within:outline-3 focus-within:outline-offset-2 focus-within:outline-ember-500"
      >
        Add a photo
        <input
          id={id}
          type="file"
          accept="image/jpeg,image/png,image/webp"
          capture="environment"
          className="sr-only"
          onChange={(e) => {
            const picked = Array.from(e.target.files ?? []);
            e.target.value = '';
            if (picked.length) onFiles([...files, ...picked]);
          }}
        />
      </label>
      {error && <p className="font-semibold text-alarm-700">{error}</p>}
      <ul className="flex flex-wrap gap-4 pt-2">
        {storedIds.map((pid) => (
          <li key={pid}>
            <img src={photoUrl(projectId, pid)} alt="Stored photo" className="h-20 w-20 rounded border-2 border-basalt-300 object-cover" />
          </li>
        ))}
        {files.map((f, i) => (
          <li key={`${i}-${f.name}-${f.lastModified}`} className="relative">
            <Thumbnail file={f} />
            <button
              type="button"
              aria-label={`Remove photo ${f.name}`}
              onClick={() => onFiles(files.filter((_, j) => j !== i))}
              className="absolute -right-3 -top-3 h-11 w-11 rounded-full border-2 border-white bg-basalt-900 text-lead font-bold text-white"
            >
              ×
            </button>
          </li>
        ))}
      </ul>
      <p className="text-caption text-basalt-700">
        {storedIds.length} stored{waiting > 0 && `, ${waiting} waiting to be sent`}
        {files.length > 0 && `, ${files.length} new — sent with “Save position”`}.
      </p>
    </div>
  );
}

const THUMB_PX = 160;
const thumbnails = new WeakMap<File, Promise<string>>();

/** A small JPEG data URL of a picked photo (the page's content policy allows data: images, not blob: ones). */
function thumbnailOf(file: File): Promise<string> {
  let made = thumbnails.get(file);
  if (!made) {
    made = createImageBitmap(file)
      .then((bitmap) => {
        const scale = Math.min(1, THUMB_PX / Math.max(bitmap.width, bitmap.height));
        const canvas = document.createElement('canvas');
        canvas.width = Math.max(1, Math.round(bitmap.width * scale));
        canvas.height = Math.max(1, Math.round(bitmap.height * scale));
        canvas.getContext('2d')?.drawImage(bitmap, 0, 0, canvas.width, canvas.height);
        bitmap.close();
        return canvas.toDataURL('image/jpeg', 0.8);
      })
      .catch(() => '');
    thumbnails.set(file, made);
  }
  return made;
}

function Thumbnail({ file }: { file: File }) {
  const [src, setSrc] = useState('');
  useEffect(() => {
    let live = true;
    void thumbnailOf(file).then((url) => live && setSrc(url));
    return () => {
      live = false;
    };
  }, [file]);
  const frame = 'h-20 w-20 rounded border-2 border-ember-500';
  return src ? (
    <img src={src} alt={`New photo ${file.name}`} className={`${frame} object-cover`} />
  ) : (
    <span
      role="img"
      aria-label={`New photo ${file.name}`}
      className={`${frame} flex items-center justify-center break-all bg-basalt-100 p-1 text-caption`}
    >
      {file.name}
    </span>
  );
}
