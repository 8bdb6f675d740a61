/** A seeded uniform generator on [0, 1) (the LCG of Numerical Recipes), so that random test cases repeat. */
export function seededRandom(seed: number): () => number {
  let s = seed >>> 0
  return () => (s = (1664525 * s + 1013904223) >>> 0) / 2 ** 32
}
