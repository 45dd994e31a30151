// Types for the parts of lib.mjs that TypeScript code (the tests) uses.
import type { ChildProcess, StdioOptions } from 'node:child_process';

export const root: string;
export const isRoot: boolean;
export const tsx: string;
export const vite: string;
export function log(msg: string): void;
export function freePort(): Promise<number>;
export function stopChild(child: ChildProcess, killAfterMs?: number, signal?: NodeJS.Signals): Promise<void>;
export function pgBinDir(): string;
export function nginxBin(): string;
export function withDatabase(url: string, name: string): string;
export function runSync(cmd: string, args: string[], env?: Record<string, string>): void;

export interface StartedPostgres {
  url: string;
  stop(): void;
  stopAsync(): Promise<void>;
  startAsync(): Promise<void>;
}
export function startPostgres(opts: { dataDir: string; port: number; throwaway?: boolean }): Promise<StartedPostgres>;

export interface SupervisedChild {
  readonly name: string;
  readonly child: ChildProcess | null;
  readonly starts: number;
  stop(signal?: NodeJS.Signals): Promise<void>;
}
export function superviseChild(
  name: string,
  cmd: string,
  args: string[],
  env?: Record<string, string>,
  opts?: {
    minDelayMs?: number;
    maxDelayMs?: number;
    stableMs?: number;
    killAfterMs?: number;
    stdio?: StdioOptions;
    onStart?: (child: ChildProcess, starts: number) => void;
  },
): SupervisedChild;
