import type { Logger } from 'pino'
import type { Sequelize } from 'sequelize'
import type { Config } from './config'
import type { Mailer } from './mail/mailer'
import type { FileStore } from './storage'

/** What services need from the outside world; built once by the server, or by a test. */
/** Takes stored spectra for processing off the request path. */
export interface ProcessingQueue {
  enqueue(spectrumId: number): void
}

export interface AppContext {
  config: Config
  sequelize: Sequelize
  mailer: Mailer
  logger: Logger
  files: FileStore
  /** Absent in tests that do not process spectra. */
  jobs?: ProcessingQueue
}
