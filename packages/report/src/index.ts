/**
 * `@motorprint/report` — what an engineer hands on after a motor fit: the versioned parameter set
 * (`motorprint.parameter-set/1`, JSON Schema in docs/parameter-set.schema.json) with each constant
 * in SI, its 95 % interval and identifiability, R carried to a reference temperature by the copper
 * law, derived datasheet figures with intervals propagated by the delta method, and writers for
 * JSON, CSV, Markdown and a self-contained HTML report with SVG plots drawn here. Pure functions:
 * objects in, strings out — no files, no clock, no printing.
 * @packageDocumentation
 */
export type {
  BuildParameterSetOptions, ConstantCovariance, ConstantName, ConstantValues, CopperLawConstant, DerivedFigure,
  DiagnosisComparisonLike, DiagnosisLike, DiagnosisParameterLike, DiagnosisResidualLike, HtmlReportInput, InputFile, JsonValue,
  OperatingCurve, ParameterEntry, ParameterSet, ParameterSetSchemaId, PlotOptions, PlotResult, PlotSeries, Provenance,
  RecordingSummary, ReportFinding, ResidualWhiteness, ResistanceAtReference, LoopTuningOptions, TuningGain, TuningSection,
} from './types.js';
export { buildParameterSet } from './buildParameterSet.js';
export { checkProvenance } from './checkProvenance.js';
export { constantCovariance } from './constantCovariance.js';
export type { CovarianceSource } from './constantCovariance.js';
export { derivedFigures } from './derivedFigures.js';
export { RENAMED_FIGURE_KEYS } from './figureDefinitions.js';
export { loopTuning } from './loopTuning.js';
export { tuningRows } from './tuningRows.js';
export { normaliseResistance } from './normaliseResistance.js';
export { readParameterSet } from './readParameterSet.js';
export { ParameterSetError } from './ParameterSetError.js';
export { formatNumber } from './formatNumber.js';
export { formatInterval, intervalDigits } from './formatInterval.js';
export type { FormatIntervalOptions } from './formatInterval.js';
export { formatParameterSetJson } from './formatParameterSetJson.js';
export { formatParameterSetCsv } from './formatParameterSetCsv.js';
export { formatParameterSetMarkdown } from './formatParameterSetMarkdown.js';
export { escapeXml } from './escapeXml.js';
export { niceTicks } from './niceTicks.js';
export { downsampleMinMax } from './downsampleMinMax.js';
export { svgLinePlot } from './svgLinePlot.js';
export { operatingCurve } from './operatingCurve.js';
export { renderHtmlReport } from './renderHtmlReport.js';
