/**
 * "1 subtype", "1.5 subtypes", "0 classes": a number with its noun, singular only when the number as
 * written is exactly one.
 */
export function countOf(n: number, one: string, many = `${one}s`, digits = 0): string {
  const text = n.toFixed(digits)
  return `${text} ${Number(text) === 1 ? one : many}`
}
