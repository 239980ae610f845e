/**
 * Colour words a formulator types ("violet", "yellow"…) as regions of CIELCh(ab) (D65, CIE 1931 2°):
 * a hue-angle range, a minimum chroma so that greys never count as a hue, and for a few words a
 * lightness range. These boundaries are Solvatlas's own working definitions (common practice, no
 * source): they were placed around the CIELAB hues of the sRGB primaries and secondaries (red ≈ 40°,
 * yellow ≈ 103°, green ≈ 136°, cyan ≈ 196°, blue ≈ 306°, magenta ≈ 328°, computed from IEC 61966-2-1)
 * and split so neighbouring words share an edge and do not overlap by hue, except where lightness
 * separates them (pink is a light red-magenta, brown a dark orange-yellow).
 *
 * CIELAB hue is far from uniform in the blue–violet region (lines of constant hab bend towards purple
 * as chroma falls; it is the region CIEDE2000's rotation term corrects). Saturated blue-violets crowd
 * between 300° and 320°: sRGB #0000ff sits at 306°, #8000ff at 312°, #9400d3 at 317°, #ff00ff at 328°.
 * The blue/violet edge is therefore put at 300°, so the sRGB blue primary counts as violet here; a
 * formulator looking for a pure blue should also try "violet" or search by hex.
 *
 * A search by word keeps only colours inside the region and ranks them by CIEDE2000 to the word's
 * `prototype` (a typical colour of that name), so the most typical match comes first.
 */
import type { Lab } from "@/lib/color/types";

export type ColourWord = {
  word: string;
  synonyms: readonly string[];
  /** Hue range in degrees, [from, to); from > to wraps through 0°. Absent for neutral words. */
  hue?: readonly [number, number];
  minChroma: number;
  maxChroma?: number;
  minL?: number;
  maxL?: number;
  /** CIELCh(ab) of a typical colour of this name: [L*, C*ab, hab]. */
  prototype: readonly [number, number, number];
};

export const COLOUR_WORDS: readonly ColourWord[] = [
  { word: "red", synonyms: ["crimson", "scarlet"], hue: [352, 50], minChroma: 25, maxL: 70, prototype: [45, 65, 35] },
  { word: "pink", synonyms: ["rose"], hue: [328, 40], minChroma: 12, minL: 70, prototype: [78, 30, 0] },
  { word: "orange", synonyms: ["amber"], hue: [50, 75], minChroma: 30, minL: 45, prototype: [68, 65, 62] },
  { word: "brown", synonyms: ["tan"], hue: [35, 90], minChroma: 12, maxL: 45, prototype: [38, 30, 60] },
  { word: "yellow", synonyms: ["gold"], hue: [75, 110], minChroma: 30, minL: 60, prototype: [88, 75, 95] },
  { word: "green", synonyms: ["olive", "lime"], hue: [110, 180], minChroma: 15, prototype: [60, 50, 140] },
  { word: "cyan", synonyms: ["teal", "turquoise"], hue: [180, 230], minChroma: 15, prototype: [70, 35, 200] },
  { word: "blue", synonyms: ["navy", "azure"], hue: [230, 300], minChroma: 15, prototype: [50, 55, 280] },
  { word: "violet", synonyms: ["indigo", "lilac"], hue: [300, 328], minChroma: 15, prototype: [40, 60, 312] },
  { word: "purple", synonyms: ["magenta", "mauve", "fuchsia"], hue: [328, 352], minChroma: 15, prototype: [45, 60, 335] },
  { word: "colourless", synonyms: ["colorless", "clear", "white"], minChroma: 0, maxChroma: 6, minL: 88, prototype: [96, 0, 0] },
  { word: "grey", synonyms: ["gray", "neutral"], minChroma: 0, maxChroma: 6, minL: 20, maxL: 88, prototype: [60, 0, 0] },
  { word: "black", synonyms: ["dark"], minChroma: 0, maxChroma: 12, maxL: 20, prototype: [10, 0, 0] },
];

const DEG = 180 / Math.PI;

export function findColourWord(text: string): ColourWord | undefined {
  const t = text.trim().toLowerCase();
  return COLOUR_WORDS.find((w) => w.word === t || w.synonyms.includes(t));
}

/** Hue angle hab in degrees, [0, 360). */
export function hueAngle(a: number, b: number): number {
  const h = Math.atan2(b, a) * DEG;
  return h < 0 ? h + 360 : h;
}

function inHueRange([from, to]: readonly [number, number], h: number): boolean {
  return from <= to ? h >= from && h < to : h >= from || h < to;
}

/** Whether a CIELAB (D65) colour is called `word`. */
export function matchesColourWord(word: ColourWord, l: number, a: number, b: number): boolean {
  const c = Math.sqrt(a * a + b * b);
  if (c < word.minChroma || (word.maxChroma !== undefined && c > word.maxChroma)) return false;
  if ((word.minL !== undefined && l < word.minL) || (word.maxL !== undefined && l > word.maxL)) return false;
  return word.hue ? inHueRange(word.hue, hueAngle(a, b)) : true;
}

export function prototypeLab(word: ColourWord): Lab {
  const [l, c, h] = word.prototype;
  return [l, c * Math.cos(h / DEG), c * Math.sin(h / DEG)];
}

/** The words a colour is called (usually one; pink/red or brown/orange can both apply). */
export function colourWordsFor(l: number, a: number, b: number): string[] {
  return COLOUR_WORDS.filter((w) => matchesColourWord(w, l, a, b)).map((w) => w.word);
}
