/**
 * Tables of the ziggurat method for the standard normal distribution, 128 layers
 * (Marsaglia & Tsang, "The ziggurat method for generating random variables",
 * J. Stat. Softw. 5(8), 2000). The layer index and the uniform come from different bits of
 * the 32-bit draw (Doornik, "An improved ziggurat method to generate normal random samples",
 * 2005), so they are not correlated: 7 low bits pick the layer, the upper 25 bits (signed)
 * the position in it.
 */

/** Right edge of the base layer (Marsaglia & Tsang 2000, 128 layers). */
export const ZIGGURAT_R = 3.442619855899;
/** Area of each layer (Marsaglia & Tsang 2000). */
const LAYER_AREA = 9.91256303526217e-3;
/** Scale of the signed 25-bit position: |position| < 2^24. */
const SCALE = 16777216;

export interface ZigguratTables {
  /** Acceptance bounds on |position| per layer (integers). */
  k: Int32Array;
  /** Position-to-x factor per layer. */
  w: Float64Array;
  /** Density exp(−x²/2) at each layer's edge. */
  f: Float64Array;
}

function buildTables(): ZigguratTables {
  const k = new Int32Array(128);
  const w = new Float64Array(128);
  const f = new Float64Array(128);
  let dn = ZIGGURAT_R;
  let tn = dn;
  const q = LAYER_AREA / Math.exp(-0.5 * dn * dn);
  k[0] = Math.floor((dn / q) * SCALE);
  k[1] = 0;
  w[0] = q / SCALE;
  w[127] = dn / SCALE;
  f[0] = 1;
  f[127] = Math.exp(-0.5 * dn * dn);
  for (let i = 126; i >= 1; i--) {
    dn = Math.sqrt(-2 * Math.log(LAYER_AREA / dn + Math.exp(-0.5 * dn * dn)));
    k[i + 1] = Math.floor((dn / tn) * SCALE);
    tn = dn;
    f[i] = Math.exp(-0.5 * dn * dn);
    w[i] = dn / SCALE;
  }
  return { k, w, f };
}

/** The shared, immutable tables. */
export const ZIGGURAT: ZigguratTables = buildTables();
