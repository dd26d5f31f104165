// Public surface of the acoustic engine. Pure TypeScript over typed arrays:
// no React, Next or DOM, so the bench Worker, the server and the command line
// import the same functions.

export { ANALYSIS_DEFAULTS, resolveOptions, validateSampleRate, OptionsError, MIN_SAMPLE_RATE_HZ, MAX_SAMPLE_RATE_HZ } from "./options";
export type { AnalysisOptions, AnalysisOptionsInput } from "./options";
export { decodeWav, decodeWavMono, readWavInfo, forEachMonoChunk, mixDown, encodeWav, WavFormatError } from "./wav";
export type { DecodedWav, DecodedMonoWav, WavInfo, WavErrorCode } from "./wav";
export { frameSizeFor, hopSizeFor, hannWindow, bandBins, framePositions, SpectrumFrame } from "./frames";
export { spectralCentroidHz, spectralFlatness, spectralRolloffHz, spectralFlux, bandPower, powerToDb } from "./features";
export { LevelMeter, levelSeries, noiseFloorDbfs, percentile } from "./level";
export type { LevelSeries } from "./level";
export { StrokeSegmenter, medianFlatness } from "./strokes";
export type { Candidate, RejectedSound, RejectionReason } from "./strokes";
export { onsetContrast, measureStroke, meanBandPower, highBandHz, meanSquareDb, planStroke, measureFrame, combineStroke, strokeBands } from "./contrast";
export type { StrokeContrast, StrokeMeasures, StrokePlan, FrameMeasure, StrokeBands } from "./contrast";
export { fitFade, fadeAt } from "./fade";
export type { FadeFit } from "./fade";
export { judgeSeat, leastSquaresSlope, ruleHoldsAt, firstSettledPosition, strokesRemaining } from "./verdict";
export type { SeatVerdict, SeatState, SettledRule, StrokeFlag, VerdictStroke } from "./verdict";
export { analyzeRecording, analyzeWavBytes, StrokeJudge, WARNING_TEXT, recordingWarnings } from "./analyzer";
export type { AnalysisResult, AnalyzeRecordingInput, Stroke, RecordingWarning, NoiseFloorSource } from "./analyzer";
export { LiveAnalyzer, createLiveAnalyzer, SPECTRA_PER_128_SAMPLES } from "./live";
export type { LiveEvent, LiveState, LiveAnalyzerInput } from "./live";
export { toReport, formatReportText } from "./report";
export type { AnalysisReport, ReportStroke } from "./report";
