/**
 * Noise and speed of deriveMotion on a synthetic constant-speed track (30 m/s, 25 Hz, 10 min) with
 * Gaussian position noise, for the default smoothing and a few alternatives.
 *
 *   npx tsx bench/main.ts kinematics [--noise 0.1]
 */
import { Rng } from "../src/core/rng.js";
import { deriveMotion } from "../src/kinematics/index.js";
import type { DeriveMotionOptions } from "../src/kinematics/index.js";

export async function run(args: string[]): Promise<void> {
  const i = args.indexOf("--noise");
  const sigma = i >= 0 ? Number(args[i + 1]) : 0.1;
  const rng = new Rng(2024);
  const n = 25 * 600;
  const dt = 0.04;
  const t = Float64Array.from({ length: n }, (_, k) => k * dt);
  const x = t.map((s) => 30 * s + rng.normal(0, sigma));
  const y = t.map(() => 1.75 + rng.normal(0, sigma));
  const sd = (a: Float64Array, mean: number) => Math.sqrt(a.reduce((s, v) => s + (v - mean) ** 2, 0) / a.length);
  const maxAbs = (a: Float64Array) => a.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
  const configs: Array<[string, DeriveMotionOptions]> = [
    ["default (1 s / 2 s, cubic)", {}],
    ["1 s / 1 s, cubic", { accelWindowS: 1 }],
    ["1 s / 2 s, quadratic", { order: 2 }],
    ["0.5 s / 0.5 s, quadratic", { windowS: 0.5, accelWindowS: 0.5, order: 2 }],
    ["2 s / 3 s, cubic", { windowS: 2, accelWindowS: 3 }],
  ];
  const figures: Record<string, number> = {};
  console.log(`constant speed 30 m/s, 25 Hz, ${n} samples, position noise sd ${sigma} m`);
  for (const [label, opts] of configs) {
    const m = deriveMotion({ t, x, y }, opts);
    const r = { sdVx: sd(m.vx, 30), sdAx: sd(m.ax, 0), maxAx: maxAbs(m.ax), sdVy: sd(m.vy, 0) };
    console.log(
      `${label.padEnd(28)} sd(vx) ${r.sdVx.toFixed(3)} m/s  sd(vy) ${r.sdVy.toFixed(3)} m/s  sd(ax) ${r.sdAx.toFixed(3)} m/s²  max|ax| ${r.maxAx.toFixed(2)} m/s²`,
    );
    if (label.startsWith("default")) Object.assign(figures, r);
  }
  // Throughput: 2000 tracks of 600 samples (1.2 M samples), derivatives only.
  const tracks = Array.from({ length: 2000 }, () => ({ t: t.subarray(0, 600), x: x.subarray(0, 600), y: y.subarray(0, 600) }));
  deriveMotion(tracks[0]!);
  const t0 = performance.now();
  for (const tr of tracks) deriveMotion(tr, { smoothPositions: false });
  const ms = performance.now() - t0;
  console.log(`deriveMotion on 1.2 M samples (2000 tracks × 600): ${ms.toFixed(0)} ms, ${(1.2e6 / (ms / 1000) / 1e6).toFixed(1)} M samples/s`);
  console.log(JSON.stringify({ bench: "kinematics", noise: sigma, ...figures, derive_ms_1_2M: Math.round(ms) }));
}
