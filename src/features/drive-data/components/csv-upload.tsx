import { useState, type ChangeEvent, type ReactNode } from 'react';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { createColumnHelper } from '@tanstack/react-table';
import { Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import type { CsvIssue } from '../../../../shared/schemas/advance-log';
import { uploadCsv, type ImportAnswer, type ImportIssue, type UploadRefusal } from '../api';

/** The server refuses larger files (server/lib/csv/read.ts); checking here saves the upload. */
const MAX_BYTES = 50 * 1024 * 1024;

type Stage =
  | { kind: 'idle' }
  | { kind: 'sending'; fraction: number; abort: () => void }
  | { kind: 'checking' }
  | { kind: 'done'; title: string; warnings: CsvIssue[] }
  | { kind: 'refused'; refusal: UploadRefusal };

const fileSize = (bytes: number) => (bytes < 1024 * 1024 ? `${(bytes / 1024).toFixed(1)} kB` : `${(bytes / 1024 / 1024).toFixed(1)} MB`);
const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en-GB')} ${n === 1 ? one : many}`;

/** A refusal's problem or an import's note: both have row, column and message. */
type ShownIssue = Pick<ImportIssue, 'row' | 'column' | 'message'>;

const issueCol = createColumnHelper<ShownIssue>();
const issueColumns = [
  issueCol.accessor((issue) => (issue.row === 0 ? 'Whole file' : (issue.row ?? '—')), {
    id: 'row',
    header: 'Row',
    meta: { csvDecimals: 0 },
    sortingFn: (a, b) => (a.original.row ?? -1) - (b.original.row ?? -1),
    cell: ({ getValue }) => <span className="whitespace-nowrap font-semibold">{getValue()}</span>,
  }),
  issueCol.accessor((issue) => issue.column || '—', { id: 'column', header: 'Column' }),
  issueCol.accessor('message', { header: 'Problem' }),
];

/** Problems (or warnings) of a file by row and column, in a table that scrolls when long. */
function IssueTable({ issues, label }: { issues: ShownIssue[]; label: string }) {
  return (
    <div className="mt-2 text-caption text-basalt-900">
      <DataTable data={issues} columns={issueColumns} label={label} exportName="kerfwise-import-problems" filterable={issues.length > 10} />
    </div>
  );
}

interface CsvUploadProps<T extends ImportAnswer> {
  title: string;
  /** What the file should hold. */
  children: ReactNode;
  /** Where to send the file; `replace` is true when the planner chose to overwrite conflicting rows. */
  url: (replace: boolean) => string;
  /** Called when a file is chosen (null when the choice is cleared), e.g. to read its header. */
  onFile?: (file: File | null) => void;
  /** A step shown between choosing the file and sending it (the column mapping). */
  step?: ReactNode;
  /** Words for a successful answer. */
  successTitle: (fileName: string, body: T) => string;
  /** Offered on a 409 (rows that differ from stored ones): the button that resends with replace. */
  replaceLabel?: string;
  onImported: () => void;
}

/**
 * Choose a CSV file, send it with upload progress, then wait while the server checks every row:
 * a refusal lists every problem by row and column (nothing was stored); conflicts may be replaced.
 */
export function CsvUpload<T extends ImportAnswer>({
  title,
  children,
  url,
  onFile,
  step,
  successTitle,
  replaceLabel,
  onImported,
}: CsvUploadProps<T>) {
  const [file, setFile] = useState<File | null>(null);
  const [stage, setStage] = useState<Stage>({ kind: 'idle' });
  const busy = stage.kind === 'sending' || stage.kind === 'checking';

  const choose = (e: ChangeEvent<HTMLInputElement>) => {
    const chosen = e.target.files?.[0] ?? null;
    e.target.value = '';
    setFile(chosen);
    setStage({ kind: 'idle' });
    onFile?.(chosen);
  };

  const send = async (replace: boolean) => {
    if (!file) return;
    if (file.size > MAX_BYTES) {
      const message = `${file.name} is ${fileSize(file.size)}; Kerfwise takes files up to 50 MB. Split it and import the parts one after another. Nothing was imported.`;
      setStage({ kind: 'refused', refusal: { ok: false, status: 413, message, issues: [], errorCount: 0 } });
      return;
    }
    const upload = uploadCsv<T>(
      url(replace),
      file,
      (fraction) => setStage((s) => (s.kind === 'sending' ? { ...s, fraction } : s)),
      () => setStage({ kind: 'checking' }),
    );
    setStage({ kind: 'sending', fraction: 0, abort: upload.abort });
    try {
      const answer = await upload.answer;
      if (!answer.ok) {
        setStage({ kind: 'refused', refusal: answer });
        return;
      }
      setStage({ kind: 'done', title: successTitle(file.name, answer.body), warnings: answer.body.warnings });
      onImported();
    } catch (err) {
      const message = err instanceof ApiError ? err.message : 'The upload failed. Try again.';
      setStage({ kind: 'refused', refusal: { ok: false, status: 0, message, issues: [], errorCount: 0 } });
    }
  };

  const percent = stage.kind === 'sending' ? Math.round(stage.fraction * 100) : 100;
  return (
    <Panel title={title}>
      <div className="space-y-4">
        <div className="space-y-2">{children}</div>
        <p className="text-caption text-basalt-600">
          Up to 50,000 rows / 50 MB per file. Every row is checked first: if any row has a problem, nothing is imported.
        </p>
        <div className="flex flex-wrap items-center gap-3">
          <label className="inline-flex min-h-touch cursor-pointer items-center rounded-md border-2 border-basalt-300 bg-white px-4 font-semibold focus-within:outline-3 focus-within:outline-ember-500 has-[:disabled]:cursor-not-allowed has-[:disabled]:text-basalt-400">
            {file ? 'Choose another file' : 'Choose a CSV file'}
            <input type="file" accept=".csv,.txt,text/csv" className="sr-only" disabled={busy} onChange={choose} />
          </label>
          {file && (
            <span className="break-all">
              <span className="font-semibold">{file.name}</span> · {fileSize(file.size)}
            </span>
          )}
        </div>
        {file && step}
        {file && (stage.kind === 'idle' || stage.kind === 'done' || (stage.kind === 'refused' && stage.refusal.status !== 409)) && (
          <Button onClick={() => send(false)} disabled={busy}>
            {stage.kind === 'idle' ? `Import ${file.name}` : 'Import again'}
          </Button>
        )}

        {stage.kind === 'sending' && (
          <div className="space-y-2">
            <div className="flex items-center gap-3">
              <div
                role="progressbar"
                aria-label={`Uploading ${file?.name ?? 'the file'}`}
                aria-valuemin={0}
                aria-valuemax={100}
                aria-valuenow={percent}
                className="h-4 flex-1 overflow-hidden rounded-full bg-basalt-100 ring-1 ring-basalt-300"
              >
                <div className="h-full bg-ember-600 transition-[width]" style={{ width: `${percent}%` }} />
              </div>
              <span className="w-16 text-right font-semibold tabular-nums">{percent} %</span>
            </div>
            <Button variant="secondary" onClick={stage.abort}>
              Cancel the upload
            </Button>
          </div>
        )}
        {stage.kind === 'checking' && (
          <div role="status" className="space-y-2">
            <div className="h-4 w-full animate-pulse rounded-full bg-ember-200 ring-1 ring-basalt-300" aria-hidden="true" />
            <p className="font-semibold">Checking and importing…</p>
            <p className="text-caption text-basalt-600">
              Every row is checked before anything is stored; a large file takes a few seconds.
            </p>
          </div>
        )}
        {stage.kind === 'done' && (
          <Alert tone="success" title={stage.title}>
            {stage.warnings.length > 0 && (
              <>
                <p className="mt-1">{plural(stage.warnings.length, 'note')} to read:</p>
                <IssueTable issues={stage.warnings} label="Notes on the imported file" />
              </>
            )}
          </Alert>
        )}
        {stage.kind === 'refused' && stage.refusal.status === 409 && replaceLabel && (
          <Alert tone="caution" title={stage.refusal.message}>
            <p className="mt-1">
              {plural(stage.refusal.errorCount, 'row differs', 'rows differ')} from what is stored. Check them; replacing overwrites the
              stored values and is kept in the audit log.
            </p>
            <IssueTable issues={stage.refusal.issues} label="Rows that differ from the stored ones" />
            {stage.refusal.issues.length < stage.refusal.errorCount && (
              <p className="mt-1">The first {stage.refusal.issues.length} are listed.</p>
            )}
            <div className="mt-3 flex flex-wrap gap-2">
              <Button variant="danger" onClick={() => send(true)}>
                {replaceLabel}
              </Button>
              <Button variant="secondary" onClick={() => setStage({ kind: 'idle' })}>
                Keep the stored ones
              </Button>
            </div>
          </Alert>
        )}
        {stage.kind === 'refused' && stage.refusal.status !== 409 && (
          <Alert tone="error" title={stage.refusal.message}>
            {stage.refusal.issues.length > 0 && (
              <>
                <p className="mt-1">
                  {plural(Math.max(stage.refusal.errorCount, stage.refusal.issues.length), 'problem')} in total
                  {stage.refusal.issues.length < stage.refusal.errorCount ? `; the first ${stage.refusal.issues.length} are listed` : ''}.
                  Row numbers are lines of the file (the header is row 1).
                </p>
                <IssueTable issues={stage.refusal.issues} label="Problems in the file" />
              </>
            )}
          </Alert>
        )}
      </div>
    </Panel>
  );
}
