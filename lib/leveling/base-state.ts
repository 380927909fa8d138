/** The measures of a base's state, all in µrad; their order is the order of every state vector. */
export const MEASURES = ['tiltXUrad', 'tiltYUrad', 'twistUrad', 'bowUrad', 'sweepXUrad', 'sweepYUrad'] as const;

/** One measure of the base's state. */
export type Measure = (typeof MEASURES)[number];

/**
 * A base's state in µrad. tiltX/tiltY: slope, positive when the +x (right) / +y (back) side is higher.
 * twist: change of cross-slope over the Y travel (positive: rises toward the back).
 * bow: change of along-slope over the Y travel (positive: rises toward the back, sag; negative: hog).
 * sweepX/sweepY: spindle tram, positive when the indicator reads higher at the right / back.
 */
export type BaseState = Record<Measure, number>;

/** A vector in MEASURES order as a state. */
export function vectorToState(vector: number[]): BaseState {
  return Object.fromEntries(MEASURES.map((m, i) => [m, vector[i] ?? 0])) as BaseState;
}
