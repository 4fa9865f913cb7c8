/** Free or compressed air, in words (never by colour alone), with the indicative working pressure. */
export function AirBadge({ compressedAir, workingPressureBar }: { compressedAir: boolean; workingPressureBar: number | null }) {
  if (!compressedAir)
    return (
      <span className="inline-flex items-center rounded-md border border-basalt-300 px-2 text-caption font-semibold text-basalt-700">
        Free air
      </span>
    );
  return (
    <span className="inline-flex flex-wrap items-center gap-x-1 rounded-md border-2 border-caution-500 bg-caution-100 px-2 text-caption font-semibold text-caution-700">
      <span>Compressed air</span>
      {workingPressureBar != null && (
        <span className="font-normal">· about {workingPressureBar.toFixed(2)} bar (indicative, from the water head)</span>
      )}
    </span>
  );
}
