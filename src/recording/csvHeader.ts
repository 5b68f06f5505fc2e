import { open } from "node:fs/promises";
import { InputError } from "../core/errors.js";

/** A CSV file's first line, read by us so that DuckDB never has to guess the layout. */
export interface CsvHeader {
  delimiter: string;
  /** Column names as in the file, in order (duplicates kept). */
  names: string[];
}

const CANDIDATES = [",", "\t", ";", "|"] as const;

/**
 * Read and split the header line of a CSV file. DuckDB's sniffer looks at the first ~20,000 lines to
 * guess delimiter, quoting and header; one malformed line in that sample makes it guess wrong (a
 * single column named like the whole header, then "missing required columns"). Reading the header
 * ourselves and handing DuckDB the exact layout (auto_detect off) makes every later malformed line an
 * error at its own line number instead. The delimiter is the candidate that occurs most often in the
 * header (tab for .tsv files); quotes follow RFC 4180 (a doubled quote inside a quoted name).
 */
export async function readCsvHeader(file: string, tsv: boolean): Promise<CsvHeader> {
  const fh = await open(file, "r");
  let text: string;
  try {
    const buf = Buffer.alloc(1 << 16);
    const { bytesRead } = await fh.read(buf, 0, buf.length, 0);
    if (bytesRead === 0) throw new InputError(`the file is empty (0 bytes); expected a header line and data rows`, { file });
    let end = buf.subarray(0, bytesRead).indexOf(10);
    if (end < 0) {
      if (bytesRead === buf.length) throw new InputError(`the first line is longer than 64 KiB; expected a header line naming the columns`, { file });
      end = bytesRead;
    }
    const line = buf.subarray(0, end);
    text = new TextDecoder("utf-8", { fatal: true }).decode(line, { stream: false });
  } catch (e) {
    if (e instanceof InputError) throw e;
    if (e instanceof TypeError) throw new InputError(`the header line is not valid UTF-8 text`, { file, row: 0 });
    throw new InputError(`cannot read the tracks file: ${(e as Error).message}`, { file });
  } finally {
    await fh.close();
  }
  text = text.replace(/^\uFEFF/, "").replace(/\r$/, "");
  if (text.trim() === "") throw new InputError(`the first line is empty; expected a header line naming the columns`, { file, row: 0 });
  let delimiter: string = tsv ? "\t" : ",";
  if (!tsv) {
    let best = 0;
    for (const d of CANDIDATES) {
      const n = text.split(d).length - 1;
      if (n > best) {
        best = n;
        delimiter = d;
      }
    }
  }
  return { delimiter, names: splitCsvLine(text, delimiter, file) };
}

/** Split one CSV line (RFC 4180 quoting). */
export function splitCsvLine(line: string, delimiter: string, file: string): string[] {
  const out: string[] = [];
  let cur = "";
  let i = 0;
  let quoted = false;
  let wasQuoted = false;
  while (i < line.length) {
    const ch = line[i]!;
    if (quoted) {
      if (ch === '"') {
        if (line[i + 1] === '"') {
          cur += '"';
          i += 2;
          continue;
        }
        quoted = false;
      } else cur += ch;
    } else if (ch === '"' && cur.trim() === "") {
      quoted = true;
      wasQuoted = true;
      cur = "";
    } else if (ch === delimiter) {
      out.push(wasQuoted ? cur : cur.trim());
      cur = "";
      wasQuoted = false;
    } else cur += ch;
    i++;
  }
  if (quoted) throw new InputError(`the header line has an unclosed quote`, { file, row: 0 });
  out.push(wasQuoted ? cur : cur.trim());
  return out;
}
