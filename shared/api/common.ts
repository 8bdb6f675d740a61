import { z } from 'zod'
import { ROLES } from '../roles'

export const id = z.coerce.number().int().positive()
export const idParams = z.object({ id })
export const email = z.string().trim().toLowerCase().email('is not an e-mail address').max(254)
export const role = z.enum(ROLES)
export const password = z.string().min(10, 'must be at least 10 characters').max(200, 'must be at most 200 characters')
export const personName = z
  .string()
  .trim()
  .min(1, 'is required')
  .max(120)
  .refine((v) => !/[\u0000-\u001f\u007f]/.test(v), { message: 'must not contain control characters or line breaks' })

const NUMBER_TEXT = /^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$/

/**
 * A number, or a number written as text (form fields and query strings carry only text). Anything
 * else (true, [], {}) stays as it is so the number schema refuses it instead of coercing it to 0 or 1.
 */
export const numeric = <T extends z.ZodType>(schema: T) => z.preprocess((v) => (typeof v === 'string' && NUMBER_TEXT.test(v) ? Number(v) : v), schema)

const CONTROL = /[\u0000-\u001f\u007f]/
const CONTROL_BUT_LINES = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/

/** One line of text: names, titles, codes. */
export const singleLine = (max: number) =>
  z
    .string()
    .trim()
    .max(max, `must be at most ${max} characters`)
    .refine((v) => !CONTROL.test(v), { message: 'must not contain control characters or line breaks' })

/** Text that may run over several lines (notes, descriptions), but holds no other control characters. */
export const multiLine = (max: number) =>
  z
    .string()
    .trim()
    .max(max, `must be at most ${max} characters`)
    .refine((v) => !CONTROL_BUT_LINES.test(v), { message: 'must not contain control characters' })

export const paging = {
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
}
export const pagingQuery = z.object(paging)
export type Paging = z.infer<typeof pagingQuery>

/** '' and null in a query string or form mean "not given". */
export const emptyToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v)

/** A campaign id that must be given. */
export const campaignRef = z.coerce.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' })

/** An MK classification as every answer writes it: the notation, its parts and their numeric codes (shared/mk.ts). */
export const mkFields = {
  /** MK notation with the class, e.g. "B5 Ib". */
  spectralType: z.string(),
  letter: z.string(),
  subtype: z.number(),
  typeCode: z.number(),
  luminosityClass: z.string(),
  classCode: z.number(),
}

/** Who did something, as the screens name them. */
export const PersonRef = z.object({ id: z.number().int(), name: z.string() }).meta({ id: 'PersonRef' })
export type PersonRef = z.infer<typeof PersonRef>

/** A campaign named in another resource. */
export const CampaignRef = z.object({ id: z.number().int(), code: z.string(), name: z.string() }).meta({ id: 'CampaignRef' })
export type CampaignRef = z.infer<typeof CampaignRef>
