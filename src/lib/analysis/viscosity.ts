/**
 * Oil tools: viscosity index (ASTM D2270), Saybolt seconds (ASTM D2161), viscosity at another temperature
 * (ASTM D341, Walther form) and SAE J300 high-temperature grades. Pure functions; mm²/s throughout.
 */

/**
 * ASTM D2270 Table 1: L and H (mm²/s at 40 °C) for kinematic viscosity at 100 °C from 2.0 to 70 mm²/s,
 * rows as [KV100, L, H].
 * Source used: the copy of Table 1 in the public repository CalebBell/chemicals, file chemicals/viscosity.py
 * (arrays VI_nus, VI_Ls, VI_Hs, commit 022ab0b777d15618fef942f0a168d05488d4a02e, MIT licence), which cites
 * ASTM D2270-10(2016). Transcribed row for row; tests/unit/analysis/viscosity.test.ts checks rows of it.
 */
export const D2270_TABLE: readonly (readonly [kv100: number, l: number, h: number])[] = [
  [2.0, 7.994, 6.394],
  [2.1, 8.64, 6.894],
  [2.2, 9.309, 7.41],
  [2.3, 10.0, 7.944],
  [2.4, 10.71, 8.496],
  [2.5, 11.45, 9.063],
  [2.6, 12.21, 9.647],
  [2.7, 13.0, 10.25],
  [2.8, 13.8, 10.87],
  [2.9, 14.63, 11.5],
  [3.0, 15.49, 12.15],
  [3.1, 16.36, 12.82],
  [3.2, 17.26, 13.51],
  [3.3, 18.18, 14.21],
  [3.4, 19.12, 14.93],
  [3.5, 20.09, 15.66],
  [3.6, 21.08, 16.42],
  [3.7, 22.09, 17.19],
  [3.8, 23.13, 17.97],
  [3.9, 24.19, 18.77],
  [4.0, 25.32, 19.56],
  [4.1, 26.5, 20.37],
  [4.2, 27.75, 21.21],
  [4.3, 29.07, 22.05],
  [4.4, 30.48, 22.92],
  [4.5, 31.96, 23.81],
  [4.6, 33.52, 24.71],
  [4.7, 35.13, 25.63],
  [4.8, 36.79, 26.57],
  [4.9, 38.5, 27.53],
  [5.0, 40.23, 28.49],
  [5.1, 41.99, 29.46],
  [5.2, 43.76, 30.43],
  [5.3, 45.53, 31.4],
  [5.4, 47.31, 32.37],
  [5.5, 49.09, 33.34],
  [5.6, 50.87, 34.32],
  [5.7, 52.64, 35.29],
  [5.8, 54.42, 36.26],
  [5.9, 56.2, 37.23],
  [6.0, 57.97, 38.19],
  [6.1, 59.74, 39.17],
  [6.2, 61.52, 40.15],
  [6.3, 63.32, 41.13],
  [6.4, 65.18, 42.14],
  [6.5, 67.12, 43.18],
  [6.6, 69.16, 44.24],
  [6.7, 71.29, 45.33],
  [6.8, 73.48, 46.44],
  [6.9, 75.72, 47.51],
  [7.0, 78.0, 48.57],
  [7.1, 80.25, 49.61],
  [7.2, 82.39, 50.69],
  [7.3, 84.53, 51.78],
  [7.4, 86.66, 52.88],
  [7.5, 88.85, 53.98],
  [7.6, 91.04, 55.09],
  [7.7, 93.2, 56.2],
  [7.8, 95.43, 57.31],
  [7.9, 97.72, 58.45],
  [8.0, 100.0, 59.6],
  [8.1, 102.3, 60.74],
  [8.2, 104.6, 61.89],
  [8.3, 106.9, 63.05],
  [8.4, 109.2, 64.18],
  [8.5, 111.5, 65.32],
  [8.6, 113.9, 66.48],
  [8.7, 116.2, 67.64],
  [8.8, 118.5, 68.79],
  [8.9, 120.9, 69.94],
  [9.0, 123.3, 71.1],
  [9.1, 125.7, 72.27],
  [9.2, 128.0, 73.42],
  [9.3, 130.4, 74.57],
  [9.4, 132.8, 75.73],
  [9.5, 135.3, 76.91],
  [9.6, 137.7, 78.08],
  [9.7, 140.1, 79.27],
  [9.8, 142.7, 80.46],
  [9.9, 145.2, 81.67],
  [10.0, 147.7, 82.87],
  [10.1, 150.3, 84.08],
  [10.2, 152.9, 85.3],
  [10.3, 155.4, 86.51],
  [10.4, 158.0, 87.72],
  [10.5, 160.6, 88.95],
  [10.6, 163.2, 90.19],
  [10.7, 165.8, 91.4],
  [10.8, 168.5, 92.65],
  [10.9, 171.2, 93.92],
  [11.0, 173.9, 95.19],
  [11.1, 176.6, 96.45],
  [11.2, 179.4, 97.71],
  [11.3, 182.1, 98.97],
  [11.4, 184.9, 100.2],
  [11.5, 187.6, 101.5],
  [11.6, 190.4, 102.8],
  [11.7, 193.3, 104.1],
  [11.8, 196.2, 105.4],
  [11.9, 199.0, 106.7],
  [12.0, 201.9, 108.0],
  [12.1, 204.8, 109.4],
  [12.2, 207.8, 110.7],
  [12.3, 210.7, 112.0],
  [12.4, 213.6, 113.3],
  [12.5, 216.6, 114.7],
  [12.6, 219.6, 116.0],
  [12.7, 222.6, 117.4],
  [12.8, 225.7, 118.7],
  [12.9, 228.8, 120.1],
  [13.0, 231.9, 121.5],
  [13.1, 235.0, 122.9],
  [13.2, 238.1, 124.2],
  [13.3, 241.2, 125.6],
  [13.4, 244.3, 127.0],
  [13.5, 247.4, 128.4],
  [13.6, 250.6, 129.8],
  [13.7, 253.8, 131.2],
  [13.8, 257.0, 132.6],
  [13.9, 260.1, 134.0],
  [14.0, 263.3, 135.4],
  [14.1, 266.6, 136.8],
  [14.2, 269.8, 138.2],
  [14.3, 273.0, 139.6],
  [14.4, 276.3, 141.0],
  [14.5, 279.6, 142.4],
  [14.6, 283.0, 143.9],
  [14.7, 286.4, 145.3],
  [14.8, 289.7, 146.8],
  [14.9, 293.0, 148.2],
  [15.0, 296.5, 149.7],
  [15.1, 300.0, 151.2],
  [15.2, 303.4, 152.6],
  [15.3, 306.9, 154.1],
  [15.4, 310.3, 155.6],
  [15.5, 313.9, 157.0],
  [15.6, 317.5, 158.6],
  [15.7, 321.1, 160.1],
  [15.8, 324.6, 161.6],
  [15.9, 328.3, 163.1],
  [16.0, 331.9, 164.6],
  [16.1, 335.5, 166.1],
  [16.2, 339.2, 167.7],
  [16.3, 342.9, 169.2],
  [16.4, 346.6, 170.7],
  [16.5, 350.3, 172.3],
  [16.6, 354.1, 173.8],
  [16.7, 358.0, 175.4],
  [16.8, 361.7, 177.0],
  [16.9, 365.6, 178.6],
  [17.0, 369.4, 180.2],
  [17.1, 373.3, 181.7],
  [17.2, 377.1, 183.3],
  [17.3, 381.0, 184.9],
  [17.4, 384.9, 186.5],
  [17.5, 388.9, 188.1],
  [17.6, 392.7, 189.7],
  [17.7, 396.7, 191.3],
  [17.8, 400.7, 192.9],
  [17.9, 404.6, 194.6],
  [18.0, 408.6, 196.2],
  [18.1, 412.6, 197.8],
  [18.2, 416.7, 199.4],
  [18.3, 420.7, 201.0],
  [18.4, 424.9, 202.6],
  [18.5, 429.0, 204.3],
  [18.6, 433.2, 205.9],
  [18.7, 437.3, 207.6],
  [18.8, 441.5, 209.3],
  [18.9, 445.7, 211.0],
  [19.0, 449.9, 212.7],
  [19.1, 454.2, 214.4],
  [19.2, 458.4, 216.1],
  [19.3, 462.7, 217.7],
  [19.4, 467.0, 219.4],
  [19.5, 471.3, 221.1],
  [19.6, 475.7, 222.8],
  [19.7, 479.7, 224.5],
  [19.8, 483.9, 226.2],
  [19.9, 488.6, 227.7],
  [20.0, 493.2, 229.5],
  [20.2, 501.5, 233.0],
  [20.4, 510.8, 236.4],
  [20.6, 519.9, 240.1],
  [20.8, 528.8, 243.5],
  [21.0, 538.4, 247.1],
  [21.2, 547.5, 250.7],
  [21.4, 556.7, 254.2],
  [21.6, 566.4, 257.8],
  [21.8, 575.6, 261.5],
  [22.0, 585.2, 264.9],
  [22.2, 595.0, 268.6],
  [22.4, 604.3, 272.3],
  [22.6, 614.2, 275.8],
  [22.8, 624.1, 279.6],
  [23.0, 633.6, 283.3],
  [23.2, 643.4, 286.8],
  [23.4, 653.8, 290.5],
  [23.6, 663.3, 294.4],
  [23.8, 673.7, 297.9],
  [24.0, 683.9, 301.8],
  [24.2, 694.5, 305.6],
  [24.4, 704.2, 309.4],
  [24.6, 714.9, 313.0],
  [24.8, 725.7, 317.0],
  [25.0, 736.5, 320.9],
  [25.2, 747.2, 324.9],
  [25.4, 758.2, 328.8],
  [25.6, 769.3, 332.7],
  [25.8, 779.7, 336.7],
  [26.0, 790.4, 340.5],
  [26.2, 801.6, 344.4],
  [26.4, 812.8, 348.4],
  [26.6, 824.1, 352.3],
  [26.8, 835.5, 356.4],
  [27.0, 847.0, 360.5],
  [27.2, 857.5, 364.6],
  [27.4, 869.0, 368.3],
  [27.6, 880.6, 372.3],
  [27.8, 892.3, 376.4],
  [28.0, 904.1, 380.6],
  [28.2, 915.8, 384.6],
  [28.4, 927.6, 388.8],
  [28.6, 938.6, 393.0],
  [28.8, 951.2, 396.6],
  [29.0, 963.4, 401.1],
  [29.2, 975.4, 405.3],
  [29.4, 987.1, 409.5],
  [29.6, 998.9, 413.5],
  [29.8, 1011.0, 417.6],
  [30.0, 1023.0, 421.7],
  [30.5, 1055.0, 432.4],
  [31.0, 1086.0, 443.2],
  [31.5, 1119.0, 454.0],
  [32.0, 1151.0, 464.9],
  [32.5, 1184.0, 475.9],
  [33.0, 1217.0, 487.0],
  [33.5, 1251.0, 498.1],
  [34.0, 1286.0, 509.6],
  [34.5, 1321.0, 521.1],
  [35.0, 1356.0, 532.5],
  [35.5, 1391.0, 544.0],
  [36.0, 1427.0, 555.6],
  [36.5, 1464.0, 567.1],
  [37.0, 1501.0, 579.3],
  [37.5, 1538.0, 591.3],
  [38.0, 1575.0, 603.1],
  [38.5, 1613.0, 615.0],
  [39.0, 1651.0, 627.1],
  [39.5, 1691.0, 639.2],
  [40.0, 1730.0, 651.8],
  [40.5, 1770.0, 664.2],
  [41.0, 1810.0, 676.6],
  [41.5, 1851.0, 689.1],
  [42.0, 1892.0, 701.9],
  [42.5, 1935.0, 714.9],
  [43.0, 1978.0, 728.2],
  [43.5, 2021.0, 741.3],
  [44.0, 2064.0, 754.4],
  [44.5, 2108.0, 767.6],
  [45.0, 2152.0, 780.9],
  [45.5, 2197.0, 794.5],
  [46.0, 2243.0, 808.2],
  [46.5, 2288.0, 821.9],
  [47.0, 2333.0, 835.5],
  [47.5, 2380.0, 849.2],
  [48.0, 2426.0, 863.0],
  [48.5, 2473.0, 876.9],
  [49.0, 2521.0, 890.9],
  [49.5, 2570.0, 905.3],
  [50.0, 2618.0, 919.6],
  [50.5, 2667.0, 933.6],
  [51.0, 2717.0, 948.2],
  [51.5, 2767.0, 962.9],
  [52.0, 2817.0, 977.5],
  [52.5, 2867.0, 992.1],
  [53.0, 2918.0, 1007.0],
  [53.5, 2969.0, 1021.0],
  [54.0, 3020.0, 1036.0],
  [54.5, 3073.0, 1051.0],
  [55.0, 3126.0, 1066.0],
  [55.5, 3180.0, 1082.0],
  [56.0, 3233.0, 1097.0],
  [56.5, 3286.0, 1112.0],
  [57.0, 3340.0, 1127.0],
  [57.5, 3396.0, 1143.0],
  [58.0, 3452.0, 1159.0],
  [58.5, 3507.0, 1175.0],
  [59.0, 3563.0, 1190.0],
  [59.5, 3619.0, 1206.0],
  [60.0, 3676.0, 1222.0],
  [60.5, 3734.0, 1238.0],
  [61.0, 3792.0, 1254.0],
  [61.5, 3850.0, 1270.0],
  [62.0, 3908.0, 1286.0],
  [62.5, 3966.0, 1303.0],
  [63.0, 4026.0, 1319.0],
  [63.5, 4087.0, 1336.0],
  [64.0, 4147.0, 1352.0],
  [64.5, 4207.0, 1369.0],
  [65.0, 4268.0, 1386.0],
  [65.5, 4329.0, 1402.0],
  [66.0, 4392.0, 1419.0],
  [66.5, 4455.0, 1436.0],
  [67.0, 4517.0, 1454.0],
  [67.5, 4580.0, 1471.0],
  [68.0, 4645.0, 1488.0],
  [68.5, 4709.0, 1506.0],
  [69.0, 4773.0, 1523.0],
  [69.5, 4839.0, 1541.0],
  [70.0, 4905.0, 1558.0],
];

/** L and H for a KV100 (mm²/s): Table 1 with linear interpolation up to 70, the D2270 equations above. */
export function lookupD2270LH(kv100: number): { l: number; h: number } {
  if (!Number.isFinite(kv100) || kv100 < 2.0) {
    throw new RangeError(`ASTM D2270 is not defined below 2.0 mm²/s at 100 °C (got ${kv100}).`);
  }
  if (kv100 > 70) {
    // ASTM D2270, equations for KV100 above 70 mm²/s.
    return { l: 0.8353 * kv100 * kv100 + 14.67 * kv100 - 216, h: 0.1684 * kv100 * kv100 + 11.85 * kv100 - 97 };
  }
  // Binary search for the first row whose KV100 is >= kv100 (the table's spacing changes at 20 and 30).
  let lo = 0;
  let hi = D2270_TABLE.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (D2270_TABLE[mid]![0] < kv100) lo = mid + 1;
    else hi = mid;
  }
  const upper = D2270_TABLE[lo]!;
  if (upper[0] === kv100 || lo === 0) return { l: upper[1], h: upper[2] };
  const lower = D2270_TABLE[lo - 1]!;
  const t = (kv100 - lower[0]) / (upper[0] - lower[0]);
  return { l: lower[1] + t * (upper[1] - lower[1]), h: lower[2] + t * (upper[2] - lower[2]) };
}

/** Viscosity index before rounding (ASTM D2270 procedure A for VI ≤ 100, procedure B above). */
export function calculateViscosityIndexUnrounded(kv40: number, kv100: number): number {
  if (!Number.isFinite(kv40) || kv40 <= 0) {
    throw new RangeError(`Kinematic viscosity at 40 °C must be a positive number (got ${kv40}).`);
  }
  if (Number.isFinite(kv100) && kv40 <= kv100) {
    // Every oil thins as it warms, so a KV40 at or below the KV100 is no real oil (most often the two
    // figures were swapped); D2270's formulas would still return a number, a meaningless one.
    throw new RangeError(
      `The viscosity at 40 °C (${kv40} mm²/s) must be higher than the one at 100 °C (${kv100} mm²/s): oil thins as it warms. Check whether the two figures were swapped.`,
    );
  }
  const { l, h } = lookupD2270LH(kv100);
  if (kv40 >= h) {
    // Procedure A: VI = 100 (L − U) / (L − H); U ≥ H is exactly the case VI ≤ 100.
    return (100 * (l - kv40)) / (l - h);
  }
  // Procedure B: N = (log H − log U) / log Y, VI = (antilog N − 1) / 0.00715 + 100.
  const n = (Math.log10(h) - Math.log10(kv40)) / Math.log10(kv100);
  return (10 ** n - 1) / 0.00715 + 100;
}

/**
 * Round half to even, as D2270 asks for a whole number and refers rounding to ASTM E29 (from memory; the
 * chemicals library above does the same). A tiny tolerance absorbs floating-point noise at exact halves.
 */
function roundHalfEven(x: number): number {
  const floor = Math.floor(x);
  const diff = x - floor;
  if (Math.abs(diff - 0.5) < 1e-9) return floor % 2 === 0 ? floor : floor + 1;
  return Math.round(x);
}

/** Viscosity index from KV40 and KV100 (mm²/s), ASTM D2270, rounded to a whole number as reported. */
export function viscosityIndex(kv40: number, kv100: number): number {
  return roundHalfEven(calculateViscosityIndexUnrounded(kv40, kv100));
}

/**
 * Above this viscosity index a figure is more likely a typing or unit slip than an engine oil: fully
 * synthetic multigrade engine oils sit around 130–200 and the highest-VI base stocks and polymer-thickened
 * oils stay well under 400 (common practice, no published source).
 */
export const PLAUSIBLE_MAX_VISCOSITY_INDEX = 400;

/** A warning sentence for a viscosity index too high for an engine oil, or null when it is plausible. */
export function explainUnusualViscosityIndex(vi: number): string | null {
  if (!(vi > PLAUSIBLE_MAX_VISCOSITY_INDEX)) return null;
  return `A viscosity index of ${vi} is far above any engine oil (they rarely pass 200; none near ${PLAUSIBLE_MAX_VISCOSITY_INDEX}). Check both viscosities and their units (mm²/s, not SUS or mPa·s) before relying on it.`;
}

/**
 * Saybolt Universal Seconds from kinematic viscosity (mm²/s) at a temperature in °F, ASTM D2161:
 * SUS(100 °F) = 4.6324 ν + (1 + 0.03264 ν) / ((3930.2 + 262.7 ν + 23.97 ν² + 1.646 ν³) · 1e−5),
 * and at another temperature t that figure times 1 + 0.000061 (t − 100).
 * D2161's conversion tables start at 1.8 mm²/s (about 32 SUS), so lower viscosities are refused.
 */
export function sayboltSeconds(kv: number, tempF: number): number {
  if (!Number.isFinite(kv) || kv < 1.8) {
    throw new RangeError(`ASTM D2161 converts kinematic viscosities from 1.8 mm²/s up (got ${kv}).`);
  }
  if (!Number.isFinite(tempF)) throw new RangeError('Temperature must be a finite number of °F.');
  const at100F = 4.6324 * kv + (1 + 0.03264 * kv) / ((3930.2 + 262.7 * kv + 23.97 * kv ** 2 + 1.646 * kv ** 3) * 1e-5);
  return at100F * (1 + 0.000061 * (tempF - 100));
}

/**
 * Kinematic viscosity (mm²/s) at tempC from KV40 and KV100, by the ASTM D341 Walther form
 * log10 log10(ν + 0.7) = A − B log10 T (T in kelvin), A and B fitted through the two measured points.
 * ASTM D341-09 and D341-17 add correction terms to Z = ν + 0.7 for viscosities below 2 mm²/s; engine oils
 * between roughly −20 °C and 150 °C stay above that, so this uses the plain 0.7 form and refuses to
 * return a result below 2.0 mm²/s, where the plain form is no longer the standard's equation.
 */
export function viscosityAt(kv40: number, kv100: number, tempC: number): number {
  if (!(kv40 > kv100) || !(kv100 >= 2)) {
    throw new RangeError('viscosityAt needs KV40 > KV100 ≥ 2.0 mm²/s.');
  }
  if (!Number.isFinite(tempC) || tempC <= -273.15) throw new RangeError('Temperature must be above absolute zero.');
  const t40 = Math.log10(40 + 273.15);
  const t100 = Math.log10(100 + 273.15);
  const z40 = Math.log10(Math.log10(kv40 + 0.7));
  const z100 = Math.log10(Math.log10(kv100 + 0.7));
  const b = (z40 - z100) / (t100 - t40);
  const a = z40 + b * t40;
  const nu = 10 ** (10 ** (a - b * Math.log10(tempC + 273.15))) - 0.7;
  if (nu < 2) {
    throw new RangeError(`Viscosity at ${tempC} °C falls below 2.0 mm²/s, outside the plain Walther form.`);
  }
  return nu;
}

export type SaeHighTempGrade = '8' | '12' | '16' | '20' | '30' | '40' | '50' | '60';

/**
 * SAE J300 (2015 revision and later) high-temperature grades: KV100 window [min, max) in mm²/s.
 * J300 also sets a minimum high-temperature high-shear viscosity per grade, which separates the
 * overlapping low grades; a lab's KV100 alone cannot, hence the rule in saeGradeOf.
 */
export const SAE_J300_GRADES: readonly { grade: SaeHighTempGrade; min: number; max: number }[] = [
  { grade: '8', min: 4.0, max: 6.1 },
  { grade: '12', min: 5.0, max: 7.1 },
  { grade: '16', min: 6.1, max: 8.2 },
  { grade: '20', min: 6.9, max: 9.3 },
  { grade: '30', min: 9.3, max: 12.5 },
  { grade: '40', min: 12.5, max: 16.3 },
  { grade: '50', min: 16.3, max: 21.9 },
  { grade: '60', min: 21.9, max: 26.1 },
];

/**
 * SAE J300 winter grades: minimum KV100 (mm²/s). Values from memory of J300's table (no maximum at
 * 100 °C for a W grade alone).
 */
export const SAE_J300_WINTER_MIN_KV100: Readonly<Record<string, number>> = {
  '0W': 3.8,
  '5W': 3.8,
  '10W': 4.1,
  '15W': 5.6,
  '20W': 5.6,
  '25W': 9.3,
};

/**
 * The SAE J300 high-temperature grade a KV100 (mm²/s) falls in, or null outside 4.0–<26.1.
 * Where low-grade windows overlap (8/12/16/20) the highest grade whose window holds the value wins, so a
 * figure reads as the thickest grade it could belong to.
 */
export function saeGradeOf(kv100: number): SaeHighTempGrade | null {
  for (let i = SAE_J300_GRADES.length - 1; i >= 0; i--) {
    const g = SAE_J300_GRADES[i]!;
    if (kv100 >= g.min && kv100 < g.max) return g.grade;
  }
  return null;
}

/**
 * SAE J300 (2015 revision and later) minimum high-temperature high-shear viscosity at 150 °C (mPa·s) of the
 * low grades whose KV100 windows overlap: 8 → 1.7, 12 → 2.0, 16 → 2.3, 20 → 2.6 (values from memory of
 * J300's table). This is what tells those grades apart; a lab's KV100 alone cannot.
 */
export const SAE_J300_MIN_HTHS: Readonly<Partial<Record<SaeHighTempGrade, number>>> = {
  '8': 1.7,
  '12': 2.0,
  '16': 2.3,
  '20': 2.6,
};

/**
 * Every SAE J300 high-temperature grade whose KV100 window [min, max) holds the value, thinnest first; empty
 * outside 4.0–<26.1 mm²/s. More than one grade means the windows overlap there and only HTHS decides.
 */
export function saeGradesOf(kv100: number): SaeHighTempGrade[] {
  return SAE_J300_GRADES.filter((g) => kv100 >= g.min && kv100 < g.max).map((g) => g.grade);
}

export interface GradeWindow {
  /** The grade as parsed, normalised, e.g. '10W-40'. */
  grade: string;
  /** KV100 window [min, max) in mm²/s; max is Infinity for a winter-only grade. */
  min: number;
  max: number;
}

/** Longest grade text read; "SAE 10W-40" is 10 characters (common practice, no published source). */
export const MAX_GRADE_TEXT = 40;

/**
 * The KV100 window (mm²/s) of an SAE grade such as '10W-40', '10w40', 'SAE 20W-50', '30' or '10W';
 * null when it is not a J300 engine-oil grade. A multigrade takes its high-temperature grade's window.
 */
export function findGradeWindow(grade: string): GradeWindow | null {
  // Capped, spaces dropped, then no two neighbouring quantifiers can match the same text: linear time.
  const m =
    grade.length > MAX_GRADE_TEXT ? null : /^(?:SAE)?(?:(\d{1,2})W)?-?(\d{1,2})?$/i.exec(grade.replace(/\s+/g, ''));
  if (!m || (m[1] === undefined && m[2] === undefined)) return null;
  const winter = m[1] !== undefined ? `${Number(m[1])}W` : undefined;
  if (winter !== undefined && SAE_J300_WINTER_MIN_KV100[winter] === undefined) return null;
  if (m[2] === undefined) {
    return { grade: winter!, min: SAE_J300_WINTER_MIN_KV100[winter!]!, max: Infinity };
  }
  const high = SAE_J300_GRADES.find((g) => g.grade === String(Number(m[2])));
  if (!high) return null;
  return { grade: winter ? `${winter}-${high.grade}` : high.grade, min: high.min, max: high.max };
}

/** True when a KV100 (mm²/s) lies inside the J300 window of the grade; null when the grade is unknown. */
export function isWithinGrade(kv100: number, grade: string): boolean | null {
  const w = findGradeWindow(grade);
  if (!w) return null;
  return kv100 >= w.min && kv100 < w.max;
}
