// Types for the plain-Node set-up helpers, so tests can start their own MariaDB with them.
export const root: string
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
