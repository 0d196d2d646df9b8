export interface ClusterSettings {
  port: number
  base: string
  dataDir: string
  socketDir: string
  logFile: string
  appUser: string
  appPassword: string
}
export interface Cluster extends ClusterSettings { bin: string }
export function pgSettings(projectRoot: string, env?: NodeJS.ProcessEnv): ClusterSettings
export function findServerBin(): string | null
export function ensureServerBinaries(): string
export function ensureCluster(projectRoot: string, options?: { fast?: boolean; env?: NodeJS.ProcessEnv }): Cluster
export function stopCluster(projectRoot: string, options?: { env?: NodeJS.ProcessEnv }): void
export function ensureDatabase(cluster: Cluster, dbName: string, options?: { recreate?: boolean }): string
export function backupDatabase(cluster: Cluster, databaseUrl: string, file: string): string
export function restoreDatabase(cluster: Cluster, file: string, dbName: string): string
export function portInUse(port: number): boolean
export function clusterOnPort(port: number): { pid: number; dataDir: string } | null
export function portTakenMessage(port: number, holder: { pid: number; dataDir: string } | null, suggestion: number, ownDataDir: string): string
