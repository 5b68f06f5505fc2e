/**
 * A small Chrome DevTools Protocol client for headless Chromium, over the debugging pipe
 * (`--remote-debugging-pipe`: the browser reads commands on fd 3 and writes replies on fd 4, each
 * a JSON message ended by a NUL byte). No npm driver and no WebSocket are needed; Debian's
 * /usr/bin/chromium is enough. Used by the browser test of the report and by
 * scripts/report-screenshots.ts.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { Readable, Writable } from "node:stream";

export const CHROMIUM = process.env.ROADSIEVE_CHROMIUM ?? "/usr/bin/chromium";

/** Why Chromium cannot run here, or null when it can. */
export function chromiumMissing(): string | null {
  return existsSync(CHROMIUM) ? null : `${CHROMIUM} is not installed (CI installs Debian's chromium)`;
}

interface Pending {
  resolve(v: Record<string, unknown>): void;
  reject(e: Error): void;
  method: string;
}

type Listener = (params: Record<string, unknown>, sessionId: string | undefined) => void;

export class Browser {
  private nextId = 1;
  private pending = new Map<number, Pending>();
  private listeners = new Map<string, Listener[]>();
  private buffer = "";
  private closed = false;

  private constructor(
    private readonly proc: ChildProcess,
    private readonly toBrowser: Writable,
    fromBrowser: Readable,
    private readonly profile: string,
  ) {
    // A broken pipe when the browser goes away is reported through the exit handler, not thrown.
    toBrowser.on("error", () => undefined);
    fromBrowser.on("error", () => undefined);
    fromBrowser.setEncoding("utf8");
    fromBrowser.on("data", (chunk: string) => this.receive(chunk));
    proc.on("exit", () => {
      this.closed = true;
      for (const p of this.pending.values()) p.reject(new Error(`chromium exited while waiting for ${p.method}`));
      this.pending.clear();
    });
  }

  /** Start a fresh headless Chromium (own profile directory, no network services, no GPU). */
  static async launch(): Promise<Browser> {
    const profile = mkdtempSync(join(tmpdir(), "roadsieve-chromium-"));
    const args = [
      "--headless",
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      "--disable-dev-shm-usage",
      `--user-data-dir=${profile}`,
      "--remote-debugging-pipe",
      "about:blank",
    ];
    const proc = spawn(CHROMIUM, args, { stdio: ["ignore", "ignore", "pipe", "pipe", "pipe"] });
    let stderr = "";
    proc.stderr!.setEncoding("utf8");
    proc.stderr!.on("data", (s: string) => {
      if (stderr.length < 20_000) stderr += s;
    });
    const b = new Browser(proc, proc.stdio[3] as Writable, proc.stdio[4] as Readable, profile);
    try {
      await b.send("Browser.getVersion", {}, undefined, 30_000);
    } catch (e) {
      await b.close();
      throw new Error(`chromium did not answer on the debugging pipe: ${(e as Error).message}\n${stderr.slice(0, 2000)}`);
    }
    return b;
  }

  private receive(chunk: string): void {
    this.buffer += chunk;
    let end: number;
    while ((end = this.buffer.indexOf("\0")) >= 0) {
      const text = this.buffer.slice(0, end);
      this.buffer = this.buffer.slice(end + 1);
      const msg = JSON.parse(text) as { id?: number; method?: string; params?: Record<string, unknown>; result?: Record<string, unknown>; error?: { message: string }; sessionId?: string };
      if (msg.id !== undefined) {
        const p = this.pending.get(msg.id);
        if (!p) continue;
        this.pending.delete(msg.id);
        if (msg.error) p.reject(new Error(`${p.method}: ${msg.error.message}`));
        else p.resolve(msg.result ?? {});
      } else if (msg.method) {
        for (const l of this.listeners.get(msg.method) ?? []) l(msg.params ?? {}, msg.sessionId);
      }
    }
  }

  /** Send one command (to the browser, or to a page session) and wait for its reply. */
  send(method: string, params: Record<string, unknown> = {}, sessionId?: string, timeoutMs = 60_000): Promise<Record<string, unknown>> {
    if (this.closed) return Promise.reject(new Error(`chromium is closed (${method})`));
    const id = this.nextId++;
    const msg = JSON.stringify(sessionId ? { id, method, params, sessionId } : { id, method, params });
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => {
        this.pending.delete(id);
        reject(new Error(`${method}: no reply within ${timeoutMs} ms`));
      }, timeoutMs);
      this.pending.set(id, {
        method,
        resolve: (v) => {
          clearTimeout(timer);
          resolve(v);
        },
        reject: (e) => {
          clearTimeout(timer);
          reject(e);
        },
      });
      this.toBrowser.write(`${msg}\0`);
    });
  }

  on(method: string, listener: Listener): void {
    const l = this.listeners.get(method) ?? [];
    l.push(listener);
    this.listeners.set(method, l);
  }

  /** Open a page of the given size, offline unless told otherwise. */
  async newPage(width: number, height: number, offline = true): Promise<Page> {
    const { targetId } = (await this.send("Target.createTarget", { url: "about:blank" })) as { targetId: string };
    const { sessionId } = (await this.send("Target.attachToTarget", { targetId, flatten: true })) as { sessionId: string };
    const page = new Page(this, sessionId);
    this.on("Runtime.exceptionThrown", (p, s) => {
      if (s !== sessionId) return;
      const d = p.exceptionDetails as { text?: string; exception?: { description?: string } };
      page.errors.push(`exception: ${d.exception?.description ?? d.text ?? "?"}`);
    });
    this.on("Runtime.consoleAPICalled", (p, s) => {
      if (s !== sessionId) return;
      const args = (p.args as { value?: unknown; description?: string }[]).map((a) => String(a.value ?? a.description ?? ""));
      if (p.type === "error" || p.type === "assert") page.errors.push(`console.${String(p.type)}: ${args.join(" ")}`);
      else page.console.push(`console.${String(p.type)}: ${args.join(" ")}`);
    });
    this.on("Log.entryAdded", (p, s) => {
      if (s !== sessionId) return;
      const e = p.entry as { level: string; text: string; url?: string };
      if (e.level === "error") page.errors.push(`log: ${e.text}${e.url ? ` (${e.url})` : ""}`);
    });
    this.on("Network.requestWillBeSent", (p, s) => {
      if (s !== sessionId) return;
      const url = (p.request as { url: string }).url;
      if (!/^(file|data|blob|about):/.test(url)) page.externalRequests.push(url);
    });
    this.on("Page.loadEventFired", (_p, s) => {
      if (s === sessionId) page.loaded = true;
    });
    await this.send("Runtime.enable", {}, sessionId);
    await this.send("Log.enable", {}, sessionId);
    await this.send("Page.enable", {}, sessionId);
    await this.send("Network.enable", {}, sessionId);
    if (offline) await this.send("Network.emulateNetworkConditions", { offline: true, latency: 0, downloadThroughput: -1, uploadThroughput: -1 }, sessionId);
    await this.send("Emulation.setDeviceMetricsOverride", { width, height, deviceScaleFactor: 1, mobile: false }, sessionId);
    return page;
  }

  /** Stop the browser (the one process this client started) and remove its profile once it has exited. */
  async close(): Promise<void> {
    if (this.proc.exitCode === null && this.proc.signalCode === null) {
      const exited = new Promise<void>((resolve) => this.proc.once("exit", () => resolve()));
      this.closed = true;
      this.proc.kill("SIGKILL");
      await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))]);
    }
    this.closed = true;
    // Chromium may still be flushing its profile for a moment; a leftover temp dir is harmless.
    try {
      rmSync(this.profile, { recursive: true, force: true, maxRetries: 3 });
    } catch {
      /* left for the OS to clean */
    }
  }
}

export class Page {
  /** Script errors: uncaught exceptions, console.error, error log entries. */
  errors: string[] = [];
  console: string[] = [];
  /** Requests to anything but file:, data:, blob:, about: URLs. */
  externalRequests: string[] = [];
  loaded = false;

  constructor(
    private readonly browser: Browser,
    readonly sessionId: string,
  ) {}

  send(method: string, params: Record<string, unknown> = {}): Promise<Record<string, unknown>> {
    return this.browser.send(method, params, this.sessionId);
  }

  /** Navigate and wait for the load event. */
  async goto(url: string, timeoutMs = 60_000): Promise<void> {
    this.loaded = false;
    await this.send("Page.navigate", { url });
    const t0 = Date.now();
    while (!this.loaded) {
      if (Date.now() - t0 > timeoutMs) throw new Error(`${url} did not finish loading within ${timeoutMs} ms`);
      await new Promise((r) => setTimeout(r, 50));
    }
  }

  /** Evaluate an expression in the page (promises awaited) and return its JSON value. */
  async evaluate<T>(expression: string): Promise<T> {
    const r = (await this.send("Runtime.evaluate", { expression, returnByValue: true, awaitPromise: true })) as {
      result: { value?: T };
      exceptionDetails?: { text: string; exception?: { description?: string } };
    };
    if (r.exceptionDetails) throw new Error(`page evaluation failed: ${r.exceptionDetails.exception?.description ?? r.exceptionDetails.text}`);
    return r.result.value as T;
  }

  /** Poll until the expression is truthy. */
  async waitFor(expression: string, timeoutMs = 60_000): Promise<void> {
    const t0 = Date.now();
    while (!(await this.evaluate<boolean>(`Boolean(${expression})`))) {
      if (Date.now() - t0 > timeoutMs) throw new Error(`timed out waiting for ${expression}`);
      await new Promise((r) => setTimeout(r, 100));
    }
  }

  /** PNG screenshot of a rectangle of the page (CSS pixels), scaled by `scale`. */
  async screenshot(clip: { x: number; y: number; width: number; height: number }, scale = 1): Promise<Buffer> {
    const r = (await this.send("Page.captureScreenshot", { format: "png", clip: { ...clip, scale }, captureBeyondViewport: true })) as { data: string };
    return Buffer.from(r.data, "base64");
  }
}
