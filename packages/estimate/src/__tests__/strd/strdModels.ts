/**
 * The 27 NIST StRD nonlinear models with analytic Jacobians, written from the model lines of the
 * `.dat` files (test support, not package API). Point-wise formulas wrapped into the vectorised
 * `CurveModel` / `CurveJacobian` shapes of `fitCurve`.
 */
import type { CurveJacobian, CurveModel } from '../../solver/types.js';

type PointModel = (b: Float64Array, x: number, x2: number) => number;
type PointGradient = (b: Float64Array, x: number, x2: number, g: Float64Array) => void;

/** A StRD model: vectorised value and Jacobian, and whether the response is log(y) (Nelson). */
export interface StrdModel {
  model: CurveModel;
  jacobian: CurveJacobian;
  logResponse: boolean;
}

function vectorise(f: PointModel, grad: PointGradient, p: number, logResponse = false): StrdModel {
  const g = new Float64Array(p);
  return {
    logResponse,
    model(b, xs, out) {
      const x1 = xs[0]!;
      const x2 = xs[1];
      for (let k = 0; k < out.length; k++) out[k] = f(b, x1[k]!, x2 ? x2[k]! : 0);
    },
    jacobian(b, xs, out) {
      const x1 = xs[0]!;
      const x2 = xs[1];
      const n = x1.length;
      for (let k = 0; k < n; k++) {
        grad(b, x1[k]!, x2 ? x2[k]! : 0, g);
        for (let j = 0; j < p; j++) out[j * n + k] = g[j]!;
      }
    },
  };
}

const PI = Math.PI;

const expRise = vectorise(
  (b, x) => b[0]! * (1 - Math.exp(-b[1]! * x)),
  (b, x, _, g) => {
    const e = Math.exp(-b[1]! * x);
    g[0] = 1 - e;
    g[1] = b[0]! * x * e;
  },
  2,
);

const chwirut = vectorise(
  (b, x) => Math.exp(-b[0]! * x) / (b[1]! + b[2]! * x),
  (b, x, _, g) => {
    const den = b[1]! + b[2]! * x;
    const y = Math.exp(-b[0]! * x) / den;
    g[0] = -x * y;
    g[1] = -y / den;
    g[2] = (-x * y) / den;
  },
  3,
);

function gaussTerm(amp: number, centre: number, width: number, x: number, g: Float64Array, j: number): void {
  const u = x - centre;
  const e = Math.exp(-(u * u) / (width * width));
  g[j] = e;
  g[j + 1] = (amp * e * 2 * u) / (width * width);
  g[j + 2] = (amp * e * 2 * u * u) / (width * width * width);
}

const gauss = vectorise(
  (b, x) =>
    b[0]! * Math.exp(-b[1]! * x) +
    b[2]! * Math.exp(-((x - b[3]!) ** 2) / b[4]! ** 2) +
    b[5]! * Math.exp(-((x - b[6]!) ** 2) / b[7]! ** 2),
  (b, x, _, g) => {
    const e = Math.exp(-b[1]! * x);
    g[0] = e;
    g[1] = -b[0]! * x * e;
    gaussTerm(b[2]!, b[3]!, b[4]!, x, g, 2);
    gaussTerm(b[5]!, b[6]!, b[7]!, x, g, 5);
  },
  8,
);

const lanczos = vectorise(
  (b, x) => b[0]! * Math.exp(-b[1]! * x) + b[2]! * Math.exp(-b[3]! * x) + b[4]! * Math.exp(-b[5]! * x),
  (b, x, _, g) => {
    for (let i = 0; i < 3; i++) {
      const e = Math.exp(-b[2 * i + 1]! * x);
      g[2 * i] = e;
      g[2 * i + 1] = -b[2 * i]! * x * e;
    }
  },
  6,
);

/** Rational function with numerator degree `nd` and denominator degree `dd` (constant term 1). */
function rational(nd: number, dd: number): StrdModel {
  const p = nd + 1 + dd;
  const parts = (b: Float64Array, x: number): [number, number] => {
    let num = 0;
    let xp = 1;
    for (let i = 0; i <= nd; i++, xp *= x) num += b[i]! * xp;
    let den = 1;
    xp = x;
    for (let i = 0; i < dd; i++, xp *= x) den += b[nd + 1 + i]! * xp;
    return [num, den];
  };
  return vectorise(
    (b, x) => {
      const [num, den] = parts(b, x);
      return num / den;
    },
    (b, x, _, g) => {
      const [num, den] = parts(b, x);
      let xp = 1;
      for (let i = 0; i <= nd; i++, xp *= x) g[i] = xp / den;
      xp = x;
      for (let i = 0; i < dd; i++, xp *= x) g[nd + 1 + i] = (-num * xp) / (den * den);
    },
    p,
  );
}

const hahnThurber = rational(3, 3);

/** The model for every StRD nonlinear dataset, by file name without `.dat`. */
export const STRD_MODELS: Record<string, StrdModel> = {
  Misra1a: expRise,
  BoxBOD: expRise,
  Misra1b: vectorise(
    (b, x) => b[0]! * (1 - (1 + (b[1]! * x) / 2) ** -2),
    (b, x, _, g) => {
      const u = 1 + (b[1]! * x) / 2;
      g[0] = 1 - 1 / (u * u);
      g[1] = (b[0]! * x) / (u * u * u);
    },
    2,
  ),
  Misra1c: vectorise(
    (b, x) => b[0]! * (1 - (1 + 2 * b[1]! * x) ** -0.5),
    (b, x, _, g) => {
      const u = 1 + 2 * b[1]! * x;
      g[0] = 1 - 1 / Math.sqrt(u);
      g[1] = (b[0]! * x) / (u * Math.sqrt(u));
    },
    2,
  ),
  Misra1d: vectorise(
    (b, x) => (b[0]! * b[1]! * x) / (1 + b[1]! * x),
    (b, x, _, g) => {
      const u = 1 + b[1]! * x;
      g[0] = (b[1]! * x) / u;
      g[1] = (b[0]! * x) / (u * u);
    },
    2,
  ),
  Chwirut1: chwirut,
  Chwirut2: chwirut,
  DanWood: vectorise(
    (b, x) => b[0]! * x ** b[1]!,
    (b, x, _, g) => {
      const xp = x ** b[1]!;
      g[0] = xp;
      g[1] = b[0]! * xp * Math.log(x);
    },
    2,
  ),
  Gauss1: gauss,
  Gauss2: gauss,
  Gauss3: gauss,
  Lanczos1: lanczos,
  Lanczos2: lanczos,
  Lanczos3: lanczos,
  Kirby2: rational(2, 2),
  Hahn1: hahnThurber,
  Thurber: hahnThurber,
  Nelson: vectorise(
    (b, x1, x2) => b[0]! - b[1]! * x1 * Math.exp(-b[2]! * x2),
    (b, x1, x2, g) => {
      const e = Math.exp(-b[2]! * x2);
      g[0] = 1;
      g[1] = -x1 * e;
      g[2] = b[1]! * x1 * x2 * e;
    },
    3,
    true,
  ),
  MGH17: vectorise(
    (b, x) => b[0]! + b[1]! * Math.exp(-x * b[3]!) + b[2]! * Math.exp(-x * b[4]!),
    (b, x, _, g) => {
      const e4 = Math.exp(-x * b[3]!);
      const e5 = Math.exp(-x * b[4]!);
      g[0] = 1;
      g[1] = e4;
      g[2] = e5;
      g[3] = -b[1]! * x * e4;
      g[4] = -b[2]! * x * e5;
    },
    5,
  ),
  Roszman1: vectorise(
    // Principal-value arctan, as in the file and MANIFEST.md.
    (b, x) => b[0]! - b[1]! * x - Math.atan(b[2]! / (x - b[3]!)) / PI,
    (b, x, _, g) => {
      const w = x - b[3]!;
      const den = w * w + b[2]! * b[2]!;
      g[0] = 1;
      g[1] = -x;
      g[2] = -w / (PI * den);
      g[3] = -b[2]! / (PI * den);
    },
    4,
  ),
  ENSO: vectorise(
    (b, x) => {
      const a0 = (2 * PI * x) / 12;
      const a1 = (2 * PI * x) / b[3]!;
      const a2 = (2 * PI * x) / b[6]!;
      return (
        b[0]! +
        b[1]! * Math.cos(a0) +
        b[2]! * Math.sin(a0) +
        b[4]! * Math.cos(a1) +
        b[5]! * Math.sin(a1) +
        b[7]! * Math.cos(a2) +
        b[8]! * Math.sin(a2)
      );
    },
    (b, x, _, g) => {
      const a0 = (2 * PI * x) / 12;
      g[0] = 1;
      g[1] = Math.cos(a0);
      g[2] = Math.sin(a0);
      for (const [pj, cj, sj] of [
        [3, 4, 5],
        [6, 7, 8],
      ] as const) {
        const per = b[pj]!;
        const a = (2 * PI * x) / per;
        const c = Math.cos(a);
        const s = Math.sin(a);
        g[cj] = c;
        g[sj] = s;
        g[pj] = ((2 * PI * x) / (per * per)) * (b[cj]! * s - b[sj]! * c);
      }
    },
    9,
  ),
  MGH09: vectorise(
    (b, x) => (b[0]! * (x * x + x * b[1]!)) / (x * x + x * b[2]! + b[3]!),
    (b, x, _, g) => {
      const num = x * x + x * b[1]!;
      const den = x * x + x * b[2]! + b[3]!;
      g[0] = num / den;
      g[1] = (b[0]! * x) / den;
      g[2] = (-b[0]! * num * x) / (den * den);
      g[3] = (-b[0]! * num) / (den * den);
    },
    4,
  ),
  Rat42: vectorise(
    (b, x) => b[0]! / (1 + Math.exp(b[1]! - b[2]! * x)),
    (b, x, _, g) => {
      const e = Math.exp(b[1]! - b[2]! * x);
      const d = 1 + e;
      g[0] = 1 / d;
      g[1] = (-b[0]! * e) / (d * d);
      g[2] = (b[0]! * x * e) / (d * d);
    },
    3,
  ),
  MGH10: vectorise(
    (b, x) => b[0]! * Math.exp(b[1]! / (x + b[2]!)),
    (b, x, _, g) => {
      const u = x + b[2]!;
      const e = Math.exp(b[1]! / u);
      g[0] = e;
      g[1] = (b[0]! * e) / u;
      g[2] = (-b[0]! * e * b[1]!) / (u * u);
    },
    3,
  ),
  Eckerle4: vectorise(
    (b, x) => (b[0]! / b[1]!) * Math.exp(-0.5 * ((x - b[2]!) / b[1]!) ** 2),
    (b, x, _, g) => {
      const u = (x - b[2]!) / b[1]!;
      const e = Math.exp(-0.5 * u * u);
      g[0] = e / b[1]!;
      g[1] = ((b[0]! * e) / (b[1]! * b[1]!)) * (u * u - 1);
      g[2] = ((b[0]! * e) / (b[1]! * b[1]!)) * u;
    },
    3,
  ),
  Rat43: vectorise(
    (b, x) => b[0]! / (1 + Math.exp(b[1]! - b[2]! * x)) ** (1 / b[3]!),
    (b, x, _, g) => {
      const e = Math.exp(b[1]! - b[2]! * x);
      const base = 1 + e;
      const pw = base ** (-1 / b[3]!);
      g[0] = pw;
      g[1] = (-b[0]! / b[3]!) * (pw / base) * e;
      g[2] = (b[0]! / b[3]!) * (pw / base) * e * x;
      g[3] = (b[0]! * pw * Math.log(base)) / (b[3]! * b[3]!);
    },
    4,
  ),
  Bennett5: vectorise(
    (b, x) => b[0]! * (b[1]! + x) ** (-1 / b[2]!),
    (b, x, _, g) => {
      const u = b[1]! + x;
      const pw = u ** (-1 / b[2]!);
      g[0] = pw;
      g[1] = (-b[0]! / b[2]!) * (pw / u);
      g[2] = (b[0]! * pw * Math.log(u)) / (b[2]! * b[2]!);
    },
    3,
  ),
};

/** The 27 dataset names in NIST's order of difficulty (lower, average, higher). */
export const STRD_NAMES = [
  'Misra1a', 'Chwirut2', 'Chwirut1', 'Lanczos3', 'Gauss1', 'Gauss2', 'DanWood', 'Misra1b',
  'Kirby2', 'Hahn1', 'Nelson', 'MGH17', 'Lanczos1', 'Lanczos2', 'Gauss3', 'Misra1c', 'Misra1d',
  'Roszman1', 'ENSO',
  'MGH09', 'Thurber', 'BoxBOD', 'Rat42', 'MGH10', 'Eckerle4', 'Rat43', 'Bennett5',
] as const;
