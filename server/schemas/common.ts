import { z } from 'zod'
import { ROLES } from '../../shared/roles'

export const idParams = z.object({ id: z.coerce.number().int().positive() })
export const email = z.string().trim().toLowerCase().email('is not an e-mail address').max(254)
export const role = z.enum(ROLES)
export const password = z.string().min(10, 'must be at least 10 characters').max(200, 'must be at most 200 characters')
export const personName = z.string().trim().min(1, 'is required').max(120).refine((v) => !/[\u0000-\u001f\u007f]/.test(v), { message: 'must not contain control characters or line breaks' })

const NUMBER_TEXT = /^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$/

/**
 * A number, or a number written as text (form fields and query strings carry only text). Anything
 * else (true, [], {}) stays as it is so the number schema refuses it instead of coercing it to 0 or 1.
 */
export const numeric = <T extends z.ZodType>(schema: T) =>
  z.preprocess((v) => (typeof v === 'string' && NUMBER_TEXT.test(v) ? Number(v) : v), schema)

const CONTROL = /[\u0000-\u001f\u007f]/
const CONTROL_BUT_LINES = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/

/** One line of text: names, titles, codes. */
export const singleLine = (max: number) =>
  z.string().trim().max(max, `must be at most ${max} characters`).refine((v) => !CONTROL.test(v), { message: 'must not contain control characters or line breaks' })

/** Text that may run over several lines (notes, descriptions), but holds no other control characters. */
export const multiLine = (max: number) =>
  z.string().trim().max(max, `must be at most ${max} characters`).refine((v) => !CONTROL_BUT_LINES.test(v), { message: 'must not contain control characters' })
