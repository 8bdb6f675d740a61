import type { Logger } from 'pino'
import type { Sequelize } from 'sequelize'
import type { Config } from './config'
import type { Mailer } from './mail/mailer'
import type { FileReading } from './jobs/reading'
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
  /** Reads uploaded files off the request thread (the server's read pool); absent, they are read on the calling thread. */
  reading?: FileReading
}
