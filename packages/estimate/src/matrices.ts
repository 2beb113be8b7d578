/**
 * The matrix library (ml-matrix: dense matrices, SVD, symmetric eigen-decomposition) and the
 * general-purpose Levenberg–Marquardt curve fitter (ml-levenberg-marquardt) motorprint uses,
 * imported in this one module and read by the other packages through `@motorprint/estimate/matrices`
 * (one copy of the classes, so `instanceof` holds across packages). The workspace build (`pnpm
 * build`, scripts/build.mjs) replaces its compiled `dist/matrices.js` by one bundled ES module of the
 * two libraries, which Node loads in about a quarter of the time it spends on their CommonJS files
 * (the export scan and the loader; ≈ 45 ms → 12 ms here). The code is theirs, unchanged.
 */
export { EigenvalueDecomposition, Matrix, SingularValueDecomposition } from 'ml-matrix';
export { levenbergMarquardt } from 'ml-levenberg-marquardt';
