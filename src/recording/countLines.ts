import { createReadStream } from "node:fs";

/**
 * Lines in a text file: newline bytes, plus one for a last line without a newline. Read in 1 MiB
 * pieces, so memory stays constant however large the file.
 */
export function countLines(path: string): Promise<number> {
  return new Promise((resolve, reject) => {
    let n = 0;
    let last = 10;
    createReadStream(path, { highWaterMark: 1 << 20 })
      .on("data", (chunk) => {
        const b = chunk as Buffer;
        let i = b.indexOf(10);
        while (i >= 0) {
          n++;
          i = b.indexOf(10, i + 1);
        }
        if (b.length > 0) last = b[b.length - 1]!;
      })
      .on("error", reject)
      .on("end", () => resolve(n + (last === 10 ? 0 : 1)));
  });
}
