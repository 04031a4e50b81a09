/**
 * The stage of a drawn sample item under a two-stage plan: both stages are drawn up front, in one
 * draw from the seed; the first n1 sample draws are the first stage and the next n2 the second
 * (spares follow them and take the stage of the item they replace). With random selection the
 * first n1 draws are themselves a random sample, and the next n2 a random sample of the rest,
 * which is what the plan's risks assume.
 */
export function stageOfDraw(index: number, firstSampleSize: number): 1 | 2 {
  return index < firstSampleSize ? 1 : 2;
}
