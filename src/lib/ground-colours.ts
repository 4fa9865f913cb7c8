/**
 * One palette for ground types, used by the long-section strip and the forecast chart alike.
 * Colours alternate dark and light, so neighbouring bands differ in lightness as well as hue
 * (readable in grey and with the common colour-vision deficiencies); reds and oranges are left to
 * the ember accent and the alarm signal. Every band also carries its name or a legend entry.
 */
const groundPalette = ['#2f5f8a', '#e3c86b', '#7f5a9b', '#a9d0e8', '#3d8a73', '#dcc0dc', '#5c6670', '#bcd99c'] as const;
const darkColours = new Set<string>(['#2f5f8a', '#7f5a9b', '#3d8a73', '#5c6670']);

/** The colour of each ground type by the ground types' order (by name), so it stays the same between visits and pages. */
export function groundColours(groundTypes: readonly { id: string }[]): Map<string, string> {
  return new Map(groundTypes.map((g, i) => [g.id, groundPalette[i % groundPalette.length]]));
}

/** Whether text on this ground colour must be light. */
export const isDarkGround = (colour: string) => darkColours.has(colour);
