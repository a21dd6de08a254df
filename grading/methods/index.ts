/** Public API of the spectral engine (exact DMD, EDMD, kernel EDMD) for the server, the scorer and the bench. */
export { exactDmd } from './dmd.js';
export { edmd, symmetricPseudoInverse } from './edmd.js';
export { kernelEdmd, kernelGramMatrices } from './kernel-edmd.js';
export { computeReference, toReferenceSpectrum, referenceHash, canonicalJson, ENGINE_VERSION, type ReferenceMeta, type ReferenceRequest } from './reference.js';
export { measureSensitivity, perturbSource, deviations, FLOAT32_LEVEL } from './sensitivity.js';
export { orderSpectrum, continuousEigenvalue, matchEigenvalues, bandSpread, bandPairing, bandRanks, conjugateGroups } from './spectrum.js';
export { chooseRank, numericalRank, optimalHardThresholdCoefficient } from './truncation.js';
export { innerProducts, innerProductsDirect, pairMatrices, validateSource } from './pairs.js';
export { buildDictionary, multiIndices } from './dictionaries.js';
export { kernelFromInner, kernelMatrix } from './kernels.js';
export * from './types.js';
