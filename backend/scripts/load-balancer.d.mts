// Types for load-balancer.mjs, used by the instances test and benchmark.
import type { ChildProcess } from 'node:child_process';

export function nginxConfig(opts: { dir: string; port: number; upstreams: number[] }): string;
export function productionEnv(databaseUrl: string): Record<string, string>;
export function signInCookie(base: string, email: string, password?: string): Promise<string>;
export function waitForOk(url: string, what: string, timeoutMs?: number): Promise<void>;

export interface LoadBalancer {
  url: string;
  port: number;
  stop(): Promise<void>;
}
export function startLoadBalancer(opts: { upstreams: number[]; port?: number }): Promise<LoadBalancer>;

export interface Instance {
  name: string;
  port: number;
  url: string;
  child: ChildProcess;
  /** Everything the instance wrote to stdout and stderr so far. */
  output: string[];
  ready(timeoutMs?: number): Promise<void>;
  stop(): Promise<void>;
}
export function startInstance(opts: { name: string; port: number; env: Record<string, string | undefined>; built?: boolean; nodeArgs?: string[] }): Instance;
