export function freePort(): Promise<number>;
export function quote(value: string): string;
export class MariaDb {
  constructor(opts: { baseDir: string; port: number });
  readonly port: number;
  readonly socket: string;
  start(opts?: { adoptRunning?: boolean }): Promise<void>;
  stop(): Promise<void>;
  sql(statements: string): string;
  destroy(): void;
}
