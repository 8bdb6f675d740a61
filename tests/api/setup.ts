import { afterAll, expect } from 'vitest'
import { apiRoutes } from '../../server/routes'
import { answerChecker } from '../helpers/openapi'
import { seenAnswers, seenContext } from '../helpers/context'

// Every JSON answer an API test receives must fit the OpenAPI document.
afterAll(() => {
  const ctx = seenContext()
  if (!ctx || seenAnswers.length === 0) return
  const check = answerChecker(apiRoutes(ctx))
  const misfits = [...new Set(seenAnswers.map(check).filter((m): m is string => m !== null))]
  seenAnswers.length = 0
  expect(misfits).toEqual([])
})
