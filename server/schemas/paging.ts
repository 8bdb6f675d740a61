import { z } from 'zod'

export const paging = {
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
}
export const pagingQuery = z.object(paging)
