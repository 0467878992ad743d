export interface DumpConnection { host: string; port: string; database: string; user: string; password: string }
export function connectionFromEnv(root: string, env?: NodeJS.ProcessEnv): DumpConnection;
export function backup(c: DumpConnection, file: string): Promise<void>;
export function restore(c: DumpConnection, file: string): Promise<void>;
