// Linewise measurement engine: plain TypeScript shared by the worker, the server and the browser.

/** Bumped whenever a measured number could change; recorded beside every stored analysis. */
export const ENGINE_VERSION = '1.2.0'

export * from './types'
export * from './matrix'
export * from './scales'
export * from './specs'
export * from './levels'
export { EngineInputError, makeRowSource, makeRowBuffers, packV210, v210Stride } from './decode'
export type { RowBuffers, RowSource } from './decode'
export { AnalysisScratch, analyseFrame, resolveMatrix, COMPOSITE_OUT_HIGH_IRE, COMPOSITE_OUT_LOW_IRE, GAMUT_MARGIN_CODE8 } from './analyse'
export { evaluateSpec } from './verdict'
export type { Measured, SpecEvaluation } from './verdict'
export { LEVEL_KEYS, packLevels, unpackLevels, packDist, unpackDist } from './pack'
export type { PackedLevels, PackedDist } from './pack'
export { spatialLevels, SPATIAL_KEYS } from './lowpass'
export { linePlot, sampleToMicroseconds, SAMPLE_RATE_MHZ, SD_ACTIVE_SAMPLES } from './line'
export { waveformGeometry, WAVEFORM_IRE_BOTTOM, WAVEFORM_IRE_TOP, WAVEFORM_ROWS } from './waveform'
export { vectorscopeCell, VECTORSCOPE_EXTENT, VECTORSCOPE_SIZE } from './vectorscope'
export { MASK_DEFAULT_WIDTH, MASK_HIGH, MASK_LOW, maskGeometry, renderMaskLayer } from './mask'
export { PALETTE, renderHistogram, renderVectorscope, renderWaveform } from './render'
export type { WaveformMode } from './render'
