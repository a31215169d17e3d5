// Candidate strips from pairs of long, straight, parallel edges about one strip width apart, for a
// strip whose bright blob merges with a pale surface, a grout line or another bright object.
import type { StripChart } from "./chart";
import type { StripCandidate } from "./geometry";
import type { SearchCopy } from "./search-copy";
import { logBlur3 } from "./log-blur";
import { median } from "./stats";

/**
 * Candidates from pairs of long, straight, parallel edges about one strip width apart: a coarse
 * Hough transform (1° by 1 px) of the sharp edges of the search copy's log whiteness. This finds
 * a strip whose bright blob merges with a pale surface, a grout line or another bright object,
 * where the thresholded components cannot separate it. Each pair's extent along the lines is
 * taken from where its edge pixels lie.
 */
/** Degrees either side of an edge pixel's gradient direction it votes for. */
const ANGLE_REACH = 3;

/** The least gradient magnitude (of log whiteness, per pixel) an edge pixel has. */
const EDGE_FLOOR = 0.008;

/** Scratch kept between searches: the per-pixel planes, the Hough accumulator. */
let planes = new Float32Array(0), houghBuffer = new Float32Array(0);
let edgeIndex = new Int32Array(0), edgeStep = new Uint8Array(0);

export function edgePairCandidates(s: SearchCopy, chart: StripChart, maxOut = 8): StripCandidate[] {
  const { w, h, whiteness } = s;
  const n = w * h;
  // The per-pixel planes are kept between searches (a photo's search would otherwise leave
  // megabytes of garbage behind): log whiteness and gradient magnitude.
  if (planes.length < 2 * n) planes = new Float32Array(2 * n);
  const L = planes.subarray(0, n);
  // Log whiteness, with a 3 × 3 box blur: a woven or grained surface's fine texture would otherwise
  // scatter the direction of a faint edge (a strip barely lighter or darker than the surface) over
  // many angles.
  logBlur3(whiteness, w, h, L);
  // Sobel gradient; edge pixels: the strongest few per cent, above a floor.
  const mag = planes.subarray(n, 2 * n);
  // The border keeps no gradient (read as a neighbour by the thinning below).
  mag.fill(0);
  const hist = new Uint32Array(256);
  for (let y = 1; y < h - 1; y++) {
    // The 3 × 3 neighbourhood slides along the row in registers (n: north, s: south; W, C, E:
    // west, centre, east columns): three loads per pixel, the same sums in the same order.
    let i = y * w + 1;
    let nW = L[i - w - 1], nC = L[i - w], cW = L[i - 1], cC = L[i], sW = L[i + w - 1], sC = L[i + w];
    for (let x = 1; x < w - 1; x++, i++) {
      const nE = L[i - w + 1], cE = L[i + 1], sE = L[i + w + 1];
      const gx = nE + 2 * cE + sE - nW - 2 * cW - sW;
      const gy = sW + 2 * sC + sE - nW - 2 * nC - nE;
      const m = Math.sqrt(gx * gx + gy * gy) * 0.125;
      mag[i] = m;
      // Only magnitudes at or above the floor can set the threshold (most pixels lie below it).
      if (m >= EDGE_FLOOR) hist[Math.min(255, (m * 1000) | 0)]++;
      (nW = nC), (nC = nE), (cW = cC), (cC = cE), (sW = sC), (sC = sE);
    }
  }
  let thr = 0;
  for (let b = 255, acc = 0; b >= 0; b--) {
    acc += hist[b];
    if (acc >= w * h * 0.1) {
      thr = b / 1000;
      break;
    }
  }
  thr = Math.max(thr, EDGE_FLOOR);
  const nT = 180, diag = Math.ceil(Math.hypot(w, h)), nR = 2 * diag + 1;
  const cosT = new Float32Array(nT), sinT = new Float32Array(nT);
  for (let k = 0; k < nT; k++) (cosT[k] = Math.cos((k * Math.PI) / nT)), (sinT[k] = Math.sin((k * Math.PI) / nT));
  if (houghBuffer.length < nT * nR) houghBuffer = new Float32Array(nT * nR);
  const acc = houghBuffer.subarray(0, nT * nR);
  acc.fill(0);
  // A vote's weight by how far (in angle steps) its direction lies from the gradient's.
  const voteWeight = new Float64Array(2 * ANGLE_REACH + 1);
  for (let dk = -ANGLE_REACH; dk <= ANGLE_REACH; dk++) voteWeight[dk + ANGLE_REACH] = 1 - Math.abs(dk) / (ANGLE_REACH + 1);
  // Edge pixels: their index in the search copy and their angle step (kept between searches).
  if (edgeIndex.length < n) (edgeIndex = new Int32Array(n)), (edgeStep = new Uint8Array(n));
  const ei = edgeIndex, et = edgeStep;
  let nEdges = 0;
  for (let y = 1; y < h - 1; y++)
    for (let x = 1; x < w - 1; x++) {
      const i = y * w + x;
      const m = mag[i];
      if (!(m > thr)) continue;
      // Both components again at the few edge pixels, as float32 (as the magnitude was kept).
      const gradX = Math.fround(L[i - w + 1] + 2 * L[i + 1] + L[i + w + 1] - L[i - w - 1] - 2 * L[i - 1] - L[i + w - 1]);
      const gradY = Math.fround(L[i + w - 1] + 2 * L[i + w] + L[i + w + 1] - L[i - w - 1] - 2 * L[i - w] - L[i - w + 1]);
      // Thin edges: keep local maxima of the magnitude across the edge (along the unit gradient
      // direction, the cos and sin of its angle).
      const c = gradX / (8 * m), sn = gradY / (8 * m);
      const dx = Math.round(c), dy = Math.round(sn);
      if (mag[i + dy * w + dx] > m || mag[i - dy * w - dx] >= m) continue;
      const a = Math.atan2(gradY, gradX);
      let th = a < 0 ? a + Math.PI : a;
      if (th >= Math.PI) th -= Math.PI;
      (ei[nEdges] = i), (et[nEdges++] = Math.round((th * nT) / Math.PI) % nT);
    }
  // Edge pixels grouped by their angle step (a counting sort), their coordinates in that order.
  const byAngle = new Int32Array(nT + 1);
  for (let j = 0; j < nEdges; j++) byAngle[et[j] + 1]++;
  for (let k = 0; k < nT; k++) byAngle[k + 1] += byAngle[k];
  const fill = byAngle.slice(0, nT), edgeX = new Int32Array(nEdges), edgeY = new Int32Array(nEdges);
  for (let j = 0; j < nEdges; j++) {
    const at = fill[et[j]]++, x = ei[j] % w;
    (edgeX[at] = x), (edgeY[at] = (ei[j] - x) / w);
  }
  // Each edge pixel votes for each direction within ±3° of its gradient's, less the further off:
  // an edge's direction from a 3 × 3 gradient is only that precise on a stepped (aliased) or grainy
  // edge. Directions are taken modulo 180° (a line's normal at θ + 180° is its normal at θ, the
  // offset taken along it), so a vote past either end lands on the other, at its own row's offset.
  // The votes are cast one direction at a time (one row of the accumulator, in cache); every
  // weight is a quarter, so the sums are exact in any order.
  for (let k = 0; k < nT; k++) {
    const row = k * nR, c = cosT[k], sn = sinT[k];
    for (let dk = -ANGLE_REACH; dk <= ANGLE_REACH; dk++) {
      const weight = voteWeight[dk + ANGLE_REACH], from = (k - dk + nT) % nT;
      for (let j = byAngle[from], end = byAngle[from + 1]; j < end; j++) acc[row + Math.round(edgeX[j] * c + edgeY[j] * sn) + diag] += weight;
    }
  }
  const aspect = chart.strip.lengthMm / chart.strip.widthMm;
  const wMin = 3, wMax = Math.max(6, (0.9 * Math.max(w, h)) / aspect * 1.4);
  const minVotes = Math.max(8, Math.min(40, (0.1 * Math.max(w, h) * 0.35)));
  type Pair = { k: number; r1: number; r2: number; score: number };
  // Pairs in flat arrays (a textured surface gives many): angle row, both offsets, score.
  let pairCap = 1024, nPairs = 0;
  let pairK = new Int32Array(pairCap), pairR1 = new Int32Array(pairCap), pairR2 = new Int32Array(pairCap), pairScore = new Float64Array(pairCap);
  // Votes of a line, with its neighbours on either side (a line's votes spread over ±1 px).
  const votes = (row: number, r: number) => acc[row + r] + 0.5 * (acc[row + r - 1] + acc[row + r + 1]);
  const peaks: number[] = [];
  for (let k = 0; k < nT; k++) {
    const row = k * nR;
    peaks.length = 0;
    for (let r = 1; r < nR - 1; r++) {
      const v = acc[row + r];
      if (v >= minVotes && v >= acc[row + r - 1] && v > acc[row + r + 1]) peaks.push(r);
    }
    for (let a = 0; a < peaks.length; a++)
      for (let b = a + 1; b < peaks.length; b++) {
        const d = peaks[b] - peaks[a];
        if (d < wMin) continue;
        if (d > wMax) break;
        if (nPairs === pairCap) {
          pairCap *= 2;
          const grow = <T extends Int32Array | Float64Array>(a: T, make: (n: number) => T) => {
            const b = make(pairCap);
            b.set(a);
            return b;
          };
          pairK = grow(pairK, (n) => new Int32Array(n));
          pairR1 = grow(pairR1, (n) => new Int32Array(n));
          pairR2 = grow(pairR2, (n) => new Int32Array(n));
          pairScore = grow(pairScore, (n) => new Float64Array(n));
        }
        pairK[nPairs] = k;
        pairR1[nPairs] = peaks[a];
        pairR2[nPairs] = peaks[b];
        pairScore[nPairs++] = Math.sqrt(votes(row, peaks[a]) * votes(row, peaks[b]));
      }
  }
  // Best first; ties keep the order found (a stable sort, as before).
  const order = new Uint32Array(nPairs);
  for (let i = 0; i < nPairs; i++) order[i] = i;
  order.sort((a, b) => pairScore[b] - pairScore[a] || a - b);
  const out: StripCandidate[] = [];
  const chosen: Pair[] = [];
  // Positions along the lines of a pair's edge pixels (a typed array, sorted without a comparator).
  let sAlong = new Float64Array(256);
  for (let oi = 0; oi < nPairs; oi++) {
    const pi = order[oi];
    const p: Pair = { k: pairK[pi], r1: pairR1[pi], r2: pairR2[pi], score: pairScore[pi] };
    if (out.length >= maxOut || chosen.length >= maxOut * 4) break;
    if (chosen.some((q) => Math.min(Math.abs(q.k - p.k), nT - Math.abs(q.k - p.k)) <= 3 && Math.abs(q.r1 - p.r1) <= 3 && Math.abs(q.r2 - p.r2) <= 3)) continue;
    chosen.push(p);
    // Extent: where edge pixels of either line lie along the lines.
    const c = cosT[p.k], sn = sinT[p.k];
    let nAlong = 0;
    let n1 = 0, n2 = 0;
    for (let dk = -(ANGLE_REACH + 1); dk <= ANGLE_REACH + 1; dk++) {
      const k = (p.k + dk + nT) % nT;
      for (let m = byAngle[k]; m < byAngle[k + 1]; m++) {
        const ex = edgeX[m], ey = edgeY[m];
        const r = ex * c + ey * sn + diag;
        const on1 = Math.abs(r - p.r1) <= 1.5, on2 = Math.abs(r - p.r2) <= 1.5;
        if (!on1 && !on2) continue;
        if (on1) n1++;
        else n2++;
        if (nAlong === sAlong.length) {
          const grown = new Float64Array(2 * nAlong);
          grown.set(sAlong);
          sAlong = grown;
        }
        sAlong[nAlong++] = -ex * sn + ey * c;
      }
    }
    if (n1 < 5 || n2 < 5) continue;
    const along = sAlong.subarray(0, nAlong).sort();
    // Longest run of edge pixels with no gap longer than two strip widths.
    const gap = Math.max(4, 2 * (p.r2 - p.r1));
    let bestA = 0, bestB = 0, a0 = 0;
    for (let j = 1; j <= along.length; j++) {
      if (j === along.length || along[j] - along[j - 1] > gap) {
        if (along[j - 1] - along[a0] > along[bestB] - along[bestA]) (bestA = a0), (bestB = j - 1);
        a0 = j;
      }
    }
    const s0 = along[bestA], s1 = along[bestB];
    const width = p.r2 - p.r1, length = s1 - s0;
    if (length < 2.5 * width) continue;
    const rm = (p.r1 + p.r2) / 2 - diag, sm = (s0 + s1) / 2;
    // A strip is a bright plastic band: along most of its length its inside is not clearly darker
    // than the surface on both sides. A grout line, a seam or a shadow's dark band is.
    const Lat = (r: number, sa: number) => {
      const x = Math.round(r * c - sa * sn), y = Math.round(r * sn + sa * c);
      return x >= 0 && y >= 0 && x < w && y < h ? L[y * w + x] : NaN;
    };
    const dOut = width / 2 + Math.max(2, width / 2);
    const contrast: number[] = [];
    for (let k = 0; k <= 24; k++) {
      const sa = s0 + ((s1 - s0) * k) / 24;
      const inside = Lat(rm, sa), o1 = Lat(rm - dOut, sa), o2 = Lat(rm + dOut, sa);
      if (Number.isNaN(inside)) continue;
      const outs = [o1, o2].filter((v) => !Number.isNaN(v));
      if (outs.length) contrast.push(inside - Math.max(...outs));
    }
    if (contrast.length >= 5 && median(contrast) < -0.15) continue;
    out.push({ cx: rm * c - sm * sn, cy: rm * sn + sm * c, angle: Math.atan2(c, -sn), length, width, score: p.score, n: length * width });
  }
  return out;
}
