import { Redis } from "ioredis";
import { InputError } from "../core/errors.js";

/** Where the queue lives: a Redis server. */
export interface QueueAddress {
  host: string;
  port: number;
  /** Queue name: several runs can share one Redis server under different names. */
  name: string;
}

export const DEFAULT_QUEUE_URL = "redis://127.0.0.1:6379";
export const DEFAULT_QUEUE_NAME = "roadsieve-extract";

/** Parse redis://HOST:PORT (the only form we take: no password or database in the address). */
export function parseQueueUrl(url: string, name = DEFAULT_QUEUE_NAME): QueueAddress {
  const m = /^redis:\/\/([^:/\s]+)(?::(\d+))?\/?$/.exec(url.trim());
  if (!m) throw new InputError(`--queue=${JSON.stringify(url)} should look like redis://HOST:PORT`);
  const port = m[2] === undefined ? 6379 : Number(m[2]);
  if (!(port >= 1 && port <= 65535)) throw new InputError(`--queue=${JSON.stringify(url)}: port ${port} should be 1..65535`);
  if (!/^[A-Za-z0-9._-]+$/.test(name)) throw new InputError(`--name=${JSON.stringify(name)} should use letters, digits, ".", "_" and "-" only`);
  return { host: m[1]!, port, name };
}

export function queueUrl(a: QueueAddress): string {
  return `redis://${a.host}:${a.port}`;
}

/** A Redis client for BullMQ (which needs maxRetriesPerRequest null on the connections it blocks on). */
export function redisClient(a: QueueAddress): Redis {
  return new Redis({ host: a.host, port: a.port, maxRetriesPerRequest: null });
}

/**
 * Fail fast when the queue cannot be reached: one connection attempt with a short timeout, no
 * retries (ioredis would otherwise retry for ever and the worker would hang silently). The error
 * names the address; the CLI turns it into exit code 2.
 */
export async function checkQueueReachable(a: QueueAddress, timeoutMs = 3000): Promise<void> {
  const c = new Redis({ host: a.host, port: a.port, lazyConnect: true, connectTimeout: timeoutMs, maxRetriesPerRequest: 0, retryStrategy: () => null, enableOfflineQueue: false });
  let first: Error | null = null;
  c.on("error", (e: Error) => (first ??= e)); // the socket's own error says more than the closed connection
  try {
    await c.connect();
    await c.ping();
  } catch (e) {
    throw new InputError(`cannot reach the queue at ${queueUrl(a)} (${(first ?? (e as Error)).message}); start Redis there or pass --queue redis://HOST:PORT`);
  } finally {
    c.disconnect();
  }
}
