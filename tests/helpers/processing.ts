import type { AppContext } from '../../server/context'
import { RedisPublisher, RedisRunner } from '../../server/jobs/redis'
import { JobRunner } from '../../server/jobs/runner'
import { createLogger } from '../../server/lib/logger'

export interface TestProcessing {
  /** Resolves when no job is queued or running. */
  idle(): Promise<void>
  stop(): Promise<void>
}

/**
 * Processing for an API test on the configured queue: the database queue by default, or with
 * QUEUE=redis (the second pass of `npm test`) a Redis publisher in the app and a Redis worker in
 * this process. The pipeline runs on the test's own thread either way.
 */
export async function startProcessing(ctx: AppContext, options: { threads?: number } = {}): Promise<TestProcessing> {
  const logger = createLogger('silent')
  if (ctx.config.QUEUE === 'redis') {
    const publisher = new RedisPublisher(ctx.config.REDIS_URL, logger)
    const runner = new RedisRunner({ sequelize: ctx.sequelize, logger, threads: options.threads ?? 1, inline: true, redisUrl: ctx.config.REDIS_URL, pollSeconds: 1 })
    ctx.jobs = publisher
    await runner.start()
    return {
      idle: () => runner.idle(),
      async stop() {
        await runner.stop()
        await publisher.close()
      },
    }
  }
  const runner = new JobRunner({ sequelize: ctx.sequelize, logger, threads: options.threads ?? 1, inline: true })
  ctx.jobs = runner
  await runner.start()
  return { idle: () => runner.idle(), stop: () => runner.stop() }
}
