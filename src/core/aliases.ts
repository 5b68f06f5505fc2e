import { InputError } from "./errors.js";

/**
 * Accept the deprecated spelling of renamed options for one version: copy each old key to its new
 * name (the new name wins when both are given with different values: that is an InputError, since
 * one of them would be silently ignored). Returns a new object without the old keys.
 */
export function renameDeprecated<T extends object>(options: T, renames: Readonly<Record<string, string>>, where: string): T {
  const out: Record<string, unknown> = { ...(options as Record<string, unknown>) };
  for (const [old, now] of Object.entries(renames)) {
    if (out[old] === undefined) {
      delete out[old];
      continue;
    }
    if (out[now] !== undefined && out[now] !== out[old])
      throw new InputError(`${where}: ${old}=${String(out[old])} and ${now}=${String(out[now])} both given; ${old} is the deprecated name of ${now}, give only ${now}`, {
        column: old,
        value: String(out[old]),
      });
    out[now] = out[old];
    delete out[old];
  }
  return out as T;
}
