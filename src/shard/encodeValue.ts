/**
 * Generic JSON encoding of plain data that survives a round trip exactly: every number (including
 * NaN, ±Infinity and −0, which JSON.stringify turns into null or 0), typed arrays (as little-endian
 * bytes in base64), nested objects and arrays in their key order. Shards store Scenario and
 * TrackManeuvers objects this way so that fields added by later work are kept without shard code
 * changes. What JSON cannot say exactly (Map, Set, BigInt, functions, `undefined` inside an array)
 * is refused with the path of the value instead of being changed silently.
 */

/** Key that marks an encoded special value. Plain data must not use it. */
const TAG = "$rs";

const TYPED = {
  Float64Array,
  Float32Array,
  Int32Array,
  Uint32Array,
  Int16Array,
  Uint16Array,
  Int8Array,
  Uint8Array,
  Uint8ClampedArray,
} as const;
type TypedName = keyof typeof TYPED;

// Typed arrays are stored as raw bytes; the reading side must share the byte order.
const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

function encodeNumber(v: number): unknown {
  if (Number.isNaN(v)) return { [TAG]: "NaN" };
  if (v === Infinity) return { [TAG]: "Infinity" };
  if (v === -Infinity) return { [TAG]: "-Infinity" };
  if (Object.is(v, -0)) return { [TAG]: "-0" };
  return v;
}

function walk(v: unknown, path: string): unknown {
  if (v === null || typeof v === "string" || typeof v === "boolean") return v;
  if (typeof v === "number") return encodeNumber(v);
  if (typeof v !== "object") throw new TypeError(`cannot encode ${typeof v} at ${path}`);
  if (ArrayBuffer.isView(v)) {
    const name = v.constructor.name;
    if (!(name in TYPED)) throw new TypeError(`cannot encode ${name} at ${path}`);
    if (!LITTLE_ENDIAN) throw new Error("typed-array encoding assumes a little-endian machine");
    return { [TAG]: name, b64: Buffer.from(v.buffer, v.byteOffset, v.byteLength).toString("base64") };
  }
  if (Array.isArray(v)) {
    return v.map((x, i) => {
      if (x === undefined) throw new TypeError(`cannot encode undefined inside an array at ${path}[${i}]`);
      return walk(x, `${path}[${i}]`);
    });
  }
  const proto = Object.getPrototypeOf(v) as unknown;
  if (proto !== Object.prototype && proto !== null) throw new TypeError(`cannot encode ${(v as object).constructor?.name ?? "object"} at ${path}`);
  const out: Record<string, unknown> = {};
  for (const [k, x] of Object.entries(v as Record<string, unknown>)) {
    if (k === TAG) throw new TypeError(`the key "${TAG}" is reserved by the encoding (at ${path})`);
    if (x === undefined) continue; // as JSON: an absent optional field
    out[k] = walk(x, `${path}.${k}`);
  }
  return out;
}

/** Encode plain data as JSON text (see the module comment for what is kept exactly). */
export function encodeValue(v: unknown): string {
  return JSON.stringify(walk(v, "$"));
}

function revive(_key: string, v: unknown): unknown {
  if (v === null || typeof v !== "object" || Array.isArray(v)) return v;
  const tag = (v as Record<string, unknown>)[TAG];
  if (tag === undefined) return v;
  switch (tag) {
    case "NaN":
      return NaN;
    case "Infinity":
      return Infinity;
    case "-Infinity":
      return -Infinity;
    case "-0":
      return -0;
  }
  if (typeof tag === "string" && tag in TYPED) {
    const bytes = Buffer.from(String((v as Record<string, unknown>).b64), "base64");
    const C = TYPED[tag as TypedName];
    // Copy into a fresh, aligned buffer (Buffer's pool offset need not be aligned).
    const buf = new ArrayBuffer(bytes.byteLength);
    new Uint8Array(buf).set(bytes);
    return new C(buf);
  }
  throw new TypeError(`unknown encoded value ${JSON.stringify(tag)}`);
}

/** Decode what `encodeValue` wrote. */
export function decodeValue(text: string): unknown {
  return JSON.parse(text, revive);
}

/**
 * JSON with object keys sorted at every level: the same content always gives the same text,
 * whatever order the keys were set in (used for manifests and for comparing options).
 */
export function canonicalJson(v: unknown, indent?: number): string {
  const sort = (x: unknown): unknown => {
    if (Array.isArray(x)) return x.map(sort);
    if (x !== null && typeof x === "object" && !ArrayBuffer.isView(x)) {
      const out: Record<string, unknown> = {};
      for (const k of Object.keys(x).sort()) if ((x as Record<string, unknown>)[k] !== undefined) out[k] = sort((x as Record<string, unknown>)[k]);
      return out;
    }
    return x;
  };
  return JSON.stringify(sort(v), null, indent);
}
