import { useEffect, useId, useRef, useState, type FormEvent, type ReactNode } from 'react';
import { discConditions, positionClassLabels, type DiscCondition } from '../../../../shared/cutters';
import { entryInputSchema } from '../../../../shared/schemas/inspection';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { photoUrl, type RoundEntry, type RoundPosition, type StoreCutter } from '../api';
import { formatSiteDateTime } from '../../../../shared/site-time';
import { discardItem, getOutboxItem, queueEntry, type QueuedEntry } from '../../../lib/outbox';
import { CutterPicker } from './cutter-picker';
import { overLimitBadge, OverLimitMark } from './marks';
import { Toggle } from './toggle';
import { WearKeypad } from './wear-keypad';

/** What the fitter has on the screen for one position, before it is saved. */
export interface Draft {
  wearText: string;
  notMeasured: boolean;
  conditions: DiscCondition[];
  action: 'none' | 'changed';
  removedSerial: string;
  fitted: { serial: string; isNew: boolean } | null;
  changeReason: string;
  note: string;
  photos: File[];
}

/** The screen's starting point for a position: the newest queued entry, else what the server stored, else empty. */
export function draftFrom(position: RoundPosition, stored: RoundEntry | undefined, queued: QueuedEntry | undefined): Draft {
  const source = queued?.body ?? stored;
  if (!source) {
    return {
      wearText: '',
      notMeasured: false,
      conditions: [],
      action: 'none',
      removedSerial: position.current?.serial ?? '',
      fitted: null,
      changeReason: '',
      note: '',
      photos: [],
    };
  }
  const changedOnServer = !queued && stored?.action === 'changed';
  return {
    wearText: source.wearMm == null ? '' : String(source.wearMm),
    notMeasured: source.wearMm == null,
    conditions: [...source.conditions],
    action: source.action,
    removedSerial: queued?.body.removedSerial ?? (changedOnServer ? '' : (position.current?.serial ?? '')),
    // A change the server holds: the serial on the position now is the one that was fitted.
    fitted: queued?.body.fitted ?? (changedOnServer && position.current ? { serial: position.current.serial, isNew: false } : null),
    changeReason: source.changeReason ?? '',
    note: source.note,
    photos: [],
  };
}

const MAX_PHOTO_BYTES = 10 * 1024 * 1024;
const ANSWER_WAIT_MS = 4000;
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
  draft: Draft;
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

/** One position of the round: what the fitter found and did, saved the moment "Save position" is pressed. */
export function EntryForm(props: Props) {
  const { projectId, roundId, timeZone, position, stored, queued, draft, onDraft, readOnly } = props;
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
  const [clientIssues, setClientIssues] = useState<{ path: string; message: string }[] | null>(null);
  const [saving, setSaving] = useState(false);
  const refused = queued?.state === 'attention' ? queued.error : undefined;
  const issues = clientIssues ?? refused?.issues ?? [];
  const fieldError = (path: string) => issues.find((i) => i.path === path || i.path.startsWith(`${path}.`))?.message;
  const wearFell = refused?.status === 409 && refused.issues.some((i) => i.path === 'wearMm');
  const changeLocked = !queued && stored?.action === 'changed';

  const update = (patch: Partial<Draft>) => {
    setClientIssues(null);
    onDraft({ ...draft, ...patch });
  };
  const toggleCondition = (key: DiscCondition) =>
    update({ conditions: draft.conditions.includes(key) ? draft.conditions.filter((c) => c !== key) : [...draft.conditions, key] });

  const save = async (remeasured: boolean) => {
    if (!draft.notMeasured && draft.wearText === '') {
      setClientIssues([{ path: 'wearMm', message: 'Enter the wear, or choose “Not measured”.' }]);
      return;
    }
    if (draft.photos.some((f) => f.size > MAX_PHOTO_BYTES)) {
      setClientIssues([{ path: 'photos', message: 'A photo is larger than 10 MB. Take it at a lower resolution.' }]);
      return;
    }
    const changed = draft.action === 'changed';
    const parsed = entryInputSchema.safeParse({
      // A refused entry is fixed under its own key: the server never stored it, and its photos point to it.
      clientKey: refused ? queued!.key : crypto.randomUUID(),
      positionId: position.id,
      wearMm: draft.notMeasured ? null : Number(draft.wearText),
      conditions: draft.conditions,
      action: draft.action,
      removedSerial: changed && draft.removedSerial.trim() ? draft.removedSerial.trim() : null,
      fitted: changed ? draft.fitted : null,
      changeReason: changed ? draft.changeReason : null,
      note: draft.note,
      remeasured,
      recordedAt: new Date().toISOString(),
    });
    if (!parsed.success) {
      setClientIssues(parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })));
      return;
    }
    setClientIssues(null);
    setSaving(true);
    try {
      const where = { projectId, roundId, positionId: position.id };
      // Waits a moment for the server's answer so a refusal shows here; after that the queue carries on alone.
      await Promise.race([
        queueEntry(where, parsed.data, draft.photos, refused ? queued : undefined),
        new Promise((r) => setTimeout(r, ANSWER_WAIT_MS)),
      ]);
    } catch (err) {
      setClientIssues([
        {
          path: '',
          message: `This device could not keep the entry (${err instanceof Error ? err.message : 'storage failed'}). Nothing was saved; try again.`,
        },
      ]);
      return;
    } finally {
      setSaving(false);
    }
    // The fitter may have moved on while the answer was awaited; then there is nothing to move from.
    if (mounted.current) props.onSaved(getOutboxItem(parsed.data.clientKey)?.state === 'attention');
  };

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    if (!readOnly && !saving) void save(false);
  };

  const lastOver = position.lastWearMm != null && position.lastWearMm >= position.wearLimitMm;
  const fittingCutters = props.storeCutters.filter((c) => c.discSizeIn === position.discSizeIn);

  return (
    <>
      <form id={formId} onSubmit={onSubmit} noValidate className="space-y-5">
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
        {clientIssues?.some((i) => !knownPaths.some((p) => i.path === p || i.path.startsWith(`${p}.`))) && (
          <Alert tone="error">{clientIssues.map((i) => i.message).join(' ')}</Alert>
        )}

        <fieldset disabled={readOnly || saving} className="grid gap-6 md:grid-cols-2">
          <WearKeypad text={draft.wearText} notMeasured={draft.notMeasured} onChange={update} error={fieldError('wearMm')}>
            {wearFell && (
              <Button variant="danger" className="min-h-14 w-full text-lead" onClick={() => void save(true)}>
                Confirm as re-measured
              </Button>
            )}
          </WearKeypad>

          <fieldset className="space-y-2">
            <legend className="mb-2 text-lead font-semibold">
              Condition <span className="text-body font-normal text-basalt-700">(all that apply)</span>
            </legend>
            <div className="grid grid-cols-2 gap-2 md:grid-cols-1 lg:grid-cols-2">
              {discConditions.map((c) => (
                <Toggle key={c.key} pressed={draft.conditions.includes(c.key)} onToggle={() => toggleCondition(c.key)}>
                  {c.label}
                  {c.needsChange && <span className="block text-caption font-normal">calls for a change</span>}
                </Toggle>
              ))}
            </div>
            {fieldError('conditions') && <p className="font-semibold text-alarm-700">{fieldError('conditions')}</p>}
          </fieldset>
        </fieldset>

        <fieldset disabled={readOnly || saving} className="space-y-3 rounded-lg border-2 border-basalt-300 bg-white p-4">
          <legend className="px-1 text-lead font-semibold">Action</legend>
          {changeLocked ? (
            <p>
              Cutter changed in this round: <strong>{draft.fitted?.serial}</strong> fitted. Reason: {draft.changeReason}. A recorded change
              is corrected by the planner, not here.
            </p>
          ) : (
            <>
              <div role="group" aria-label="Action" className="grid grid-cols-2 gap-2">
                <Toggle pressed={draft.action === 'none'} onToggle={() => update({ action: 'none' })}>
                  No change
                </Toggle>
                <Toggle pressed={draft.action === 'changed'} onToggle={() => update({ action: 'changed' })}>
                  Cutter changed
                </Toggle>
              </div>
              {draft.action === 'changed' && (
                <div className="grid gap-4 md:grid-cols-2">
                  <TextField
                    label="Serial removed"
                    value={draft.removedSerial}
                    autoComplete="off"
                    onChange={(e) => update({ removedSerial: e.target.value })}
                    error={fieldError('removedSerial')}
                    hint={
                      position.current
                        ? `Kerfwise has ${position.current.serial} here.`
                        : 'Kerfwise has no cutter here; leave empty if none was on.'
                    }
                  />
                  <div className="space-y-2">
                    <TextField
                      label="Reason for the change"
                      value={draft.changeReason}
                      onChange={(e) => update({ changeReason: e.target.value })}
                      error={fieldError('changeReason')}
                    />
                    <div className="flex flex-wrap gap-2">
                      {quickReasons.map((r) => (
                        <button
                          key={r}
                          type="button"
                          onClick={() => update({ changeReason: r })}
                          className="min-h-touch rounded-md border-2 border-basalt-300 bg-basalt-50 px-3 font-semibold"
                        >
                          {r}
                        </button>
                      ))}
                    </div>
                  </div>
                  <div className="md:col-span-2">
                    <CutterPicker
                      cutters={fittingCutters}
                      value={draft.fitted}
                      onChange={(fitted) => update({ fitted })}
                      error={fieldError('fitted')}
                    />
                  </div>
                </div>
              )}
            </>
          )}
        </fieldset>

        <fieldset disabled={readOnly || saving} className="grid gap-6 md:grid-cols-2">
          <NoteField value={draft.note} onChange={(note) => update({ note })} error={fieldError('note')} />
          <Photos
            projectId={projectId}
            files={draft.photos}
            storedIds={stored?.photoIds ?? []}
            waiting={props.waitingPhotos}
            onFiles={(photos) => update({ photos })}
            error={fieldError('photos')}
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

const knownPaths = ['wearMm', 'conditions', 'removedSerial', 'fitted', 'changeReason', 'note', 'photos'];

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
