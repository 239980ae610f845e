/**
 * Colour words a formulator types ("violet", "yellow"…) as regions of CIELCh(ab) (D65, CIE 1931 2°):
 * a hue-angle range, a minimum chroma so that greys never count as a hue, and for a few words a
 * lightness range. The boundaries are Solvatlas's own working definitions, placed against a published
 * anchor set: the named colours of CSS Color Module Level 4 (W3C, §6.1 "Named Colors"), converted to
 * CIELAB D65 with IEC 61966-2-1 (sRGB) and CIE 015:2018. Each word's region contains the CSS colours
 * of that name and its plain variants; the tests list them (tests/unit/search-words-shift.test.ts).
 *
 * Regions (hab in degrees, C*ab, L*):
 *  - red 352–50 (C ≥ 25, L ≤ 70); pink 328–40 light (C ≥ 12, L ≥ 70): CSS pink 8°, lightpink 10°.
 *  - orange 50–75 (C ≥ 20, L ≥ 45): CSS orange 73°, darkorange 64°; brown 35–90 dark (C ≥ 12, L ≤ 45).
 *  - yellow 75–112 (C ≥ 12, L ≥ 60): CSS yellow 103°, gold 91°, khaki 101°, and the PALE yellows —
 *    lemonchiffon (L* 97.6, C* 23), lightgoldenrodyellow (C* 20), lightyellow (C* 16), cornsilk (C* 14.5).
 *    Pale colours have low chroma, so the old C* ≥ 30 left a pale yellow (L* 92, C* 25) without a name.
 *  - green 112–180; cyan 180–230 (CSS cyan and teal 196°).
 *  - blue 230–310: CSS blue, mediumblue, darkblue and navy all sit at 306.3° (the sRGB blue primary),
 *    slateblue and mediumslateblue at 302°, royalblue 292°, dodgerblue 279°, steelblue 263°.
 *  - violet 310–328: CSS blueviolet 313°, rebeccapurple 312°, indigo 314°, darkviolet 317°, violet 327°.
 *  - purple 328–352: CSS purple, magenta and darkmagenta 328.2°, orchid 328.1°.
 *  - neutral words by chroma and lightness only (colourless, grey, black).
 * CIELAB hue is far from uniform in the blue–violet region (lines of constant hab bend towards purple
 * as chroma falls, the region CIEDE2000's rotation term corrects), so the blue/violet edge is put just
 * past the sRGB blue primary, at 310°.
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
  { word: "orange", synonyms: ["amber"], hue: [50, 75], minChroma: 20, minL: 45, prototype: [68, 65, 62] },
  { word: "brown", synonyms: ["tan"], hue: [35, 90], minChroma: 12, maxL: 45, prototype: [38, 30, 60] },
  { word: "yellow", synonyms: ["gold"], hue: [75, 112], minChroma: 12, minL: 60, prototype: [88, 75, 95] },
  { word: "green", synonyms: ["olive", "lime"], hue: [112, 180], minChroma: 15, prototype: [60, 50, 140] },
  { word: "cyan", synonyms: ["teal", "turquoise"], hue: [180, 230], minChroma: 15, prototype: [70, 35, 200] },
  { word: "blue", synonyms: ["navy", "azure"], hue: [230, 310], minChroma: 15, prototype: [45, 60, 290] },
  { word: "violet", synonyms: ["indigo", "lilac"], hue: [310, 328], minChroma: 15, prototype: [40, 80, 316] },
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
