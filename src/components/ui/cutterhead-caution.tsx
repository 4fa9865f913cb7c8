import { CUTTERHEAD_ENTRY_CAUTION } from '../../../shared/cautions';

/** The cutterhead entry caution (shared/cautions.ts), on every screen used for work in the cutterhead: rounds and the cutterhead picture. */
export function CutterheadCaution() {
  return (
    <aside aria-label="Safety caution" className="rounded-md border-l-8 border-caution-500 bg-caution-100 px-4 py-3 text-caution-700">
      <p>
        <strong>Caution:</strong> {CUTTERHEAD_ENTRY_CAUTION}
      </p>
    </aside>
  );
}
