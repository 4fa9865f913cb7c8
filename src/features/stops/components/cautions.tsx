import { COMPRESSED_AIR_CAUTION } from '../../../../shared/domain/compressed-air';

/**
 * The cautions the server sends with a plan or a stop (cutterhead entry always, compressed air when
 * it applies), shown in full and kept on the printed work pack.
 */
export function StopCautions({ cautions }: { cautions: string[] }) {
  return (
    <section aria-label="Cautions" className="caution-block space-y-2">
      {cautions.map((text) => (
        <div
          key={text}
          role="note"
          className="rounded-md border-l-8 border-caution-500 bg-caution-100 px-4 py-3 text-caution-700 print:border-l-4 print:bg-white print:text-basalt-900"
        >
          <p className="font-semibold">{text === COMPRESSED_AIR_CAUTION ? '⚠ Compressed air' : '⚠ Work in the cutterhead'}</p>
          <p>{text}</p>
        </div>
      ))}
    </section>
  );
}
