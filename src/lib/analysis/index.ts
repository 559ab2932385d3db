/**
 * Sumpwise analysis engine: pure TypeScript, no database, no Astro, no fetch.
 *
 * API summary
 * - judgeHistory({ machine, samples, limits? }) → per sample { sampleId, worst, call, nextIntervalDistance, findings }:
 *   the replay production uses (replayHistory gives the full analysis and call of each sample).
 * - analyseSample({ machine, history, sample, limits? }) → { findings, worst, readingLevels, baselineStatus,
 *   bands, wearRates, cautions }. `history` holds the machine's previous accepted samples, oldest first;
 *   `limits` are a crew lead's overrides of DEFAULT_FIXED_LIMITS.
 * - makeIntervalCall({ machine, history, sample, limits?, analysis?, previousWorst? }) → { call: 'shorten'|'hold'|'stretch'|'fix-first',
 *   nextIntervalDistance, nextSampleDue: { distance, date? }, reasons, basis }. Never beyond the
 *   manufacturer's longest interval (machine.maxIntervalDistance / maxIntervalDays).
 * - RULE_DEFINITIONS: id, title, description, source and thresholds of every rule, the same data the rule
 *   functions read (render it on the rules page). Rule functions: findBaselineJumps, findClimbingTrends,
 *   findFixedLimitBreaches, findViscosityOutsideGrade, findFuelDilution, findCoolantMarkers, findDirtEntry,
 *   findAdditiveMismatch.
 * - Baselines: computeBaseline(values) → { n, mean, sd, min, max }; computeBaselineBand(previous, settings);
 *   computeTrendFit(points) → { slope, intercept, r2 }.
 * - Wear rate: computeWearRate(ppm, distanceOnOil, unit, { topUpVolume, oilVolume }) → ppm per 1,000 mi/km or
 *   per 100 h, top-up corrected (an approximation).
 * - Oil tools: viscosityIndex(kv40, kv100), sayboltSeconds(kv, tempF), viscosityAt(kv40, kv100, tempC),
 *   saeGradeOf(kv100), saeGradesOf(kv100) (every overlapping grade), findGradeWindow('10W-40'),
 *   isWithinGrade(kv100, grade), explainUnusualViscosityIndex(vi).
 * - Catalogue: MEASURANDS, getMeasurand(code), listMeasurandsOfGroup(group), plus ELEMENT_CODES,
 *   CONDITION_CODES, MEASURAND_CODES, isMeasurandCode.
 */
export * from './measurands';
export * from './types';
export * from './figures';
export * from './viscosity';
export * from './baseline';
export * from './wear-rate';
export * from './rule-definitions';
export * from './rules';
export * from './crew-reference';
export * from './analyse-sample';
export * from './interval-call';
export * from './judge-history';
export * from './statistics';
