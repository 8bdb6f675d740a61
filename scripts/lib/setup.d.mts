// Types for the plain-Node set-up helpers, so tests can start their own MariaDB with them.
export const root: string
export const WORKER_NODE_FLAGS: string[]
export const SERVER_NODE_FLAGS: string[]
export function log(message: string): void
export function run(command: string, args: string[], options?: object): void
export function ensureNodeModules(): void
export function ensureDebianPackages(wanted: Record<string, string>): void
export interface ManagedMariaDB {
  socket: string
  stop(): Promise<void>
}
export function startMariaDB(options: { dir: string; port: number }): Promise<ManagedMariaDB>
export function ensureDatabase(options: { socket: string; name: string; user: string; password: string; grantAll?: boolean }): void
export function persistentSecret(file: string): string
export function bin(name: string): string
export function appEnv(base?: NodeJS.ProcessEnv): { env: NodeJS.ProcessEnv; dataDir: string; manageDb: boolean }
export function portInUse(port: number | string, host?: string): Promise<boolean>
export function ensurePortsFree(ports: Array<{ name: string; port: number | string; host?: string }>): Promise<void>
export interface Supervisor {
  readonly child: import('node:child_process').ChildProcess | null
  stop(): Promise<void>
}
export function supervise(options: {
  start: () => import('node:child_process').ChildProcess
  name?: string
  minDelayMs?: number
  maxDelayMs?: number
  healthyMs?: number
  fatalCodes?: number[]
  onRestart?: (info: { code: number | null; signal: string | null; delay: number }) => void
  onFatal?: (code: number | null) => void
}): Supervisor
export function mariadbRunning(dir: string): boolean
export function freePort(): Promise<number>
export function startRedis(options: { dir: string; port: number }): Promise<{ url: string; stop(): Promise<void> }>
export function startS3Fake(options: { dir: string; port: number; bucket: string }): Promise<{ endpoint: string; stop(): Promise<void> }>
