import { defaultAssumptions, isDefaultSize } from './assumptions';
import type { CaseAssumptions, Mark } from './schema';

/*
 * The object's spans against its assumed size: range comes from size over angle, so a span marked
 * across the object's length, divided into a wingspan's size, gives a wrong range with an interval
 * that looks honest. This says when the two disagree.
 */
export type SpanDimension = NonNullable<CaseAssumptions['sizeDimension']>;

export interface DimensionMismatch {
  /** What the assumed size is. */
  assumed: SpanDimension;
  /** What the disagreeing spans were marked as. */
  marked: SpanDimension;
  /** How many object spans disagree, of how many. */
  spans: number;
  of: number;
}

/**
 * Which dimension the assumed size is; null when it does not say, or when it is the tool's default
 * size, which follows whatever the spans are marked as (assumptions.ts sizeForMarks), so that a
 * default never warns.
 */
export function assumedDimension(a: CaseAssumptions | undefined): SpanDimension | null {
  const given = a ?? defaultAssumptions();
  if (isDefaultSize(given)) return null;
  return given.sizeDimension ?? null;
}

/**
 * A span marked as `marked` against the assumed size: both dimensions when they disagree; null when
 * they agree, or either does not say (the one rule the overlay and the whole-case check share).
 */
export function disagreement(marked: Mark['dimension'], a: CaseAssumptions | undefined): { marked: SpanDimension; assumed: SpanDimension } | null {
  const assumed = assumedDimension(a);
  return assumed && (marked === 'wingspan' || marked === 'length') && marked !== assumed ? { marked, assumed } : null;
}

/** Object spans marked as another dimension than the assumed size is; null when none disagree, or the size does not say. */
export function dimensionMismatch(marks: readonly Mark[], a: CaseAssumptions | undefined): DimensionMismatch | null {
  const spans = marks.filter((m) => m.kind === 'object-span');
  const off = spans.map((m) => disagreement(m.dimension, a)).filter((d) => d !== null);
  if (off.length === 0) return null;
  return { ...off[0]!, spans: off.length, of: spans.length };
}

/** The mismatch in one plain sentence, for the popup and the shared summary. */
export function mismatchText(d: DimensionMismatch): string {
  const which = d.spans === d.of ? (d.of === 1 ? "The object's span is" : `All ${d.of} of the object's spans are`) : `${d.spans} of the object's ${d.of} spans are`;
  return `${which} marked as its ${d.marked}, but the size assumed is a ${d.assumed}: the range from ${d.spans === 1 ? 'it' : 'them'} is wrong until a size by ${d.marked} is chosen or the ${d.assumed} is marked.`;
}
