/**
 * Finding the ball in a small window of one gray frame: background by temporal median, difference,
 * robust noise level, threshold, blob labelling, and a sub-pixel weighted centroid.
 *
 * Plain loops over typed arrays, on purpose: the window is a few thousand pixels, so the work per
 * frame is well under a millisecond here, while handing frames to a native image library (sharp)
 * would copy each frame across and still leave the background model and labelling to write; OpenCV
 * ports are tens of megabytes of WebAssembly for these few operations.
 *
 * Coordinates: continuous pixel coordinates with (0, 0) at the top-left corner of the top-left
 * pixel, so pixel (i, j) has its centre at (i + 0.5, j + 0.5).
 */

/** A window [x0, x1) × [y0, y1) of a frame. */
export interface Roi {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

/** The window of half-size `half` around (cx, cy), clipped to the frame; null when nothing of it is inside. */
export function roiAround(cx: number, cy: number, half: number, width: number, height: number): Roi | null {
  const x0 = Math.max(0, Math.floor(cx - half));
  const y0 = Math.max(0, Math.floor(cy - half));
  const x1 = Math.min(width, Math.ceil(cx + half));
  const y1 = Math.min(height, Math.ceil(cy + half));
  return x1 - x0 >= 3 && y1 - y0 >= 3 ? { x0, y0, x1, y1 } : null;
}

/**
 * Per-pixel median of `samples` over the window, written row by row into `out` (window-sized).
 * The temporal median is the classic robust background estimate: a moving object present in
 * fewer than half of the samples does not show in it (Cucchiara et al., "Detecting moving objects,
 * ghosts and shadows in video streams", IEEE TPAMI 25 (2003) 1337).
 */
export function medianBackground(samples: Uint8Array[], width: number, roi: Roi, out: Uint8Array): void {
  const n = samples.length;
  const vals = new Uint8Array(n);
  const mid = n >> 1;
  let o = 0;
  for (let y = roi.y0; y < roi.y1; y++) {
    const row = y * width;
    for (let x = roi.x0; x < roi.x1; x++) {
      const idx = row + x;
      for (let s = 0; s < n; s++) {
        // Insertion into the sorted prefix: n is at most a dozen.
        const v = samples[s]![idx]!;
        let k = s;
        while (k > 0 && vals[k - 1]! > v) {
          vals[k] = vals[k - 1]!;
          k--;
        }
        vals[k] = v;
      }
      out[o++] = n % 2 === 1 ? vals[mid]! : (vals[mid - 1]! + vals[mid]! + 1) >> 1;
    }
  }
}

export interface DetectParams {
  /** Predicted centre. */
  x: number;
  y: number;
  /** Largest distance of the blob's centre from the prediction. */
  gate: number;
  /** Expected ball radius, or null when not known yet. */
  radius: number | null;
  /** Among blobs within the gate, prefer the one nearest this point (default: the centre above). */
  prefer?: { x: number; y: number };
}

export interface Detection {
  /** Sub-pixel centre. */
  x: number;
  y: number;
  /** Sum of the centroid weights: the blob's area in pixels at full contrast. */
  weightArea: number;
  /** Pixels over the threshold in the blob. */
  pixels: number;
  /** Mean absolute difference from the background over the blob, gray levels. */
  contrast: number;
  /** Robust noise level of the difference image in the window, gray levels. */
  noise: number;
  /** Distance of the centre from the prediction. */
  distance: number;
  /**
   * Radius from the smaller principal second moment of the weights: a uniform disk of radius r has
   * variance r²/4 along every axis, and motion blur stretches only the axis of motion.
   */
  minorRadius: number;
}

/**
 * Looks for the ball in `roi` of `frame` against `background` (window-sized).
 * @returns the blob nearest the prediction whose size fits, with its sub-pixel centre; null if none.
 */
export function detectBall(frame: Uint8Array, background: Uint8Array, width: number, roi: Roi, p: DetectParams): Detection | null {
  const rw = roi.x1 - roi.x0;
  const rh = roi.y1 - roi.y0;
  const n = rw * rh;
  const diff = new Uint8Array(n);
  const hist = new Uint32Array(256);
  for (let y = 0, o = 0; y < rh; y++) {
    const row = (roi.y0 + y) * width + roi.x0;
    for (let x = 0; x < rw; x++, o++) {
      const d = Math.abs(frame[row + x]! - background[o]!);
      diff[o] = d;
      hist[d]!++;
    }
  }
  // Noise by the median absolute difference, scaled to a standard deviation for normal noise
  // (1.4826 · MAD; Rousseeuw & Croux, JASA 88 (1993) 1273). The ball covers a minority of the window.
  let acc = 0;
  let med = 0;
  for (; med < 256; med++) {
    acc += hist[med]!;
    if (acc * 2 >= n) break;
  }
  const noise = Math.max(0.7, 1.4826 * med);
  const threshold = Math.max(4 * noise, 5);

  const blobs = labelBlobs(diff, rw, rh, threshold);
  const minPixels = p.radius ? Math.max(2, Math.floor(0.12 * Math.PI * p.radius * p.radius)) : 3;
  const expectedArea = p.radius ? Math.PI * p.radius * p.radius : null;
  const prefer = p.prefer ?? p;
  let best: { score: number; x: number; y: number; pixels: number; keep: Uint8Array | null; reach: number } | null = null;
  for (const b of blobs.list) {
    if (b.count < minPixels) continue;
    let cand = { x: roi.x0 + b.sx / b.count + 0.5, y: roi.y0 + b.sy / b.count + 0.5, pixels: b.count, keep: null as Uint8Array | null, reach: 0 };
    if (p.radius && expectedArea && b.count > 1.5 * expectedArea) {
      // Far too big for the ball: it touches something else that changed (a player, the ghost of
      // one in the background). Open the blob to cut thin joins and keep the part nearest the prediction.
      const part = splitBlob(blobs.labels, diff, b, rw, roi, prefer, p.radius);
      if (!part || part.pixels < minPixels) continue;
      cand = part;
    }
    if (Math.hypot(cand.x - p.x, cand.y - p.y) > p.gate) continue;
    const dist = Math.hypot(cand.x - prefer.x, cand.y - prefer.y);
    const sizePenalty = expectedArea ? 0.5 * Math.abs(Math.log(cand.pixels / expectedArea)) : 0;
    const score = dist / Math.max(p.gate, 1) + sizePenalty;
    if (!best || score < best.score) {
      let reach = cand.reach;
      if (!cand.keep) {
        // The blob's own extent bounds the centroid window.
        let extent = 0;
        for (let i = 0; i < n; i++) {
          if (blobs.labels[i] !== b.label) continue;
          const ix = i % rw;
          const iy = (i - ix) / rw;
          extent = Math.max(extent, Math.hypot(roi.x0 + ix + 0.5 - cand.x, roi.y0 + iy + 0.5 - cand.y));
        }
        reach = extent + 2;
      }
      best = { score, x: cand.x, y: cand.y, pixels: cand.pixels, keep: cand.keep, reach };
    }
  }
  if (!best) return null;

  // Contrast level of the chosen blob (over-threshold pixels in its window), for the weights.
  const levels: number[] = [];
  forWindow(roi, rw, rh, best.x, best.y, best.reach, best.keep, (i) => {
    if (diff[i]! > threshold) levels.push(diff[i]!);
  });
  if (levels.length === 0) return null;
  levels.sort((a, b) => a - b);
  const p75 = levels[Math.floor(levels.length * 0.75)]!;
  const contrast = levels.reduce((a, v) => a + v, 0) / levels.length;
  // Weights rise from just above the noise to full at a third of the blob's typical contrast, so
  // a shaded ball weighs evenly across its disk (not towards its highlight) and a partly covered
  // rim pixel weighs by how much of it the ball covers.
  const lo = 2.5 * noise;
  const hi = Math.max(lo + 3 * noise, 0.3 * p75);
  const weight = (i: number): number => {
    const w = (diff[i]! - lo) / (hi - lo);
    return w <= 0 ? 0 : w > 1 ? 1 : w;
  };

  let cx = best.x;
  let cy = best.y;
  let weightArea = 0;
  for (let iter = 0; iter < 3; iter++) {
    let sw = 0;
    let swx = 0;
    let swy = 0;
    forWindow(roi, rw, rh, cx, cy, best.reach, best.keep, (i, px, py) => {
      const w = weight(i);
      sw += w;
      swx += w * px;
      swy += w * py;
    });
    if (sw <= 0) break;
    cx = swx / sw;
    cy = swy / sw;
    weightArea = sw;
  }
  let sxx = 0;
  let syy = 0;
  let sxy = 0;
  let sw = 0;
  forWindow(roi, rw, rh, cx, cy, best.reach, best.keep, (i, px, py) => {
    const w = weight(i);
    sw += w;
    sxx += w * (px - cx) ** 2;
    syy += w * (py - cy) ** 2;
    sxy += w * (px - cx) * (py - cy);
  });
  const norm = Math.max(sw, 1e-9);
  const half = (sxx + syy) / (2 * norm);
  const dev = Math.sqrt(((sxx - syy) / (2 * norm)) ** 2 + (sxy / norm) ** 2);
  return {
    x: cx,
    y: cy,
    weightArea,
    pixels: best.pixels,
    contrast,
    noise,
    distance: Math.hypot(cx - p.x, cy - p.y),
    minorRadius: 2 * Math.sqrt(Math.max(0, half - dev)),
  };
}

/** Calls `visit` for each window pixel within `reach` of (cx, cy) — and inside `keep` when given. */
function forWindow(
  roi: Roi,
  rw: number,
  rh: number,
  cx: number,
  cy: number,
  reach: number,
  keep: Uint8Array | null,
  visit: (i: number, px: number, py: number) => void,
): void {
  const x0 = Math.max(0, Math.floor(cx - reach - roi.x0));
  const x1 = Math.min(rw, Math.ceil(cx + reach - roi.x0));
  const y0 = Math.max(0, Math.floor(cy - reach - roi.y0));
  const y1 = Math.min(rh, Math.ceil(cy + reach - roi.y0));
  const r2 = reach * reach;
  for (let y = y0; y < y1; y++) {
    const py = roi.y0 + y + 0.5;
    for (let x = x0; x < x1; x++) {
      const px = roi.x0 + x + 0.5;
      if ((px - cx) * (px - cx) + (py - cy) * (py - cy) > r2) continue;
      const i = y * rw + x;
      if (keep && keep[i] === 0) continue;
      visit(i, px, py);
    }
  }
}

interface Blob {
  label: number;
  count: number;
  sx: number;
  sy: number;
  minX: number;
  maxX: number;
  minY: number;
  maxY: number;
}

/** 8-connected labelling of the pixels above `threshold` (iterative flood fill). */
function labelBlobs(diff: Uint8Array, rw: number, rh: number, threshold: number): { labels: Int32Array; list: Blob[] } {
  const n = rw * rh;
  const labels = new Int32Array(n);
  const stack = new Int32Array(n);
  const list: Blob[] = [];
  for (let start = 0; start < n; start++) {
    if (diff[start]! <= threshold || labels[start] !== 0) continue;
    const b: Blob = { label: list.length + 1, count: 0, sx: 0, sy: 0, minX: rw, maxX: -1, minY: rh, maxY: -1 };
    let top = 0;
    stack[top++] = start;
    labels[start] = b.label;
    while (top > 0) {
      const i = stack[--top]!;
      const ix = i % rw;
      const iy = (i - ix) / rw;
      b.count++;
      b.sx += ix;
      b.sy += iy;
      if (ix < b.minX) b.minX = ix;
      if (ix > b.maxX) b.maxX = ix;
      if (iy < b.minY) b.minY = iy;
      if (iy > b.maxY) b.maxY = iy;
      for (let dy = -1; dy <= 1; dy++) {
        const ny = iy + dy;
        if (ny < 0 || ny >= rh) continue;
        for (let dx = -1; dx <= 1; dx++) {
          const nx = ix + dx;
          if (nx < 0 || nx >= rw) continue;
          const j = ny * rw + nx;
          if (labels[j] === 0 && diff[j]! > threshold) {
            labels[j] = b.label;
            stack[top++] = j;
          }
        }
      }
    }
    list.push(b);
  }
  return { labels, list };
}

/**
 * Separates the ball from something its blob touches. First a morphological opening (erosion by
 * about a third of the ball radius, then labelling what is left) cuts thin joins; when the part
 * nearest the prediction is still too big for the ball (the ball in front of a player), the blob
 * is cut again at half its strongest differences (2nd percentile from the top), since a ball usually stands out more than the
 * rest. Returns the part nearest `near` and a mask of it grown back by the erosion depth plus one.
 */
function splitBlob(
  labels: Int32Array,
  diff: Uint8Array,
  b: Blob,
  rw: number,
  roi: Roi,
  near: { x: number; y: number },
  radius: number,
): { x: number; y: number; pixels: number; keep: Uint8Array; reach: number } | null {
  const depth = Math.max(1, Math.round(radius / 3));
  const bw = b.maxX - b.minX + 1;
  const bh = b.maxY - b.minY + 1;
  const at = (x: number, y: number): number => (b.minY + y) * rw + b.minX + x;
  const original = new Uint8Array(bw * bh);
  const levels: number[] = [];
  for (let y = 0; y < bh; y++) {
    for (let x = 0; x < bw; x++) {
      if (labels[at(x, y)] !== b.label) continue;
      original[y * bw + x] = 1;
      levels.push(diff[at(x, y)]!);
    }
  }
  const morph = (src: Uint8Array, erode: boolean): Uint8Array => {
    const out = new Uint8Array(src.length);
    for (let y = 0; y < bh; y++) {
      for (let x = 0; x < bw; x++) {
        let all = true;
        let any = false;
        for (let dy = -1; dy <= 1; dy++) {
          for (let dx = -1; dx <= 1; dx++) {
            const nx = x + dx;
            const ny = y + dy;
            const v = nx >= 0 && ny >= 0 && nx < bw && ny < bh ? src[ny * bw + nx]! : 0;
            if (v) any = true;
            else all = false;
          }
        }
        out[y * bw + x] = erode ? (all ? 1 : 0) : any ? 1 : 0;
      }
    }
    return out;
  };
  /** The 8-connected part of `mask` whose centroid is nearest `near`, as a mask, with its size. */
  const nearestPart = (mask: Uint8Array): { part: Uint8Array; count: number } | null => {
    const partLabels = new Int32Array(bw * bh);
    const stack = new Int32Array(bw * bh);
    let bestPart = 0;
    let bestCount = 0;
    let bestDist = Infinity;
    let parts = 0;
    for (let s0 = 0; s0 < mask.length; s0++) {
      if (!mask[s0] || partLabels[s0]) continue;
      parts++;
      let top = 0;
      stack[top++] = s0;
      partLabels[s0] = parts;
      let count = 0;
      let sx = 0;
      let sy = 0;
      while (top > 0) {
        const i = stack[--top]!;
        const ix = i % bw;
        const iy = (i - ix) / bw;
        count++;
        sx += ix;
        sy += iy;
        for (let dy = -1; dy <= 1; dy++) {
          for (let dx = -1; dx <= 1; dx++) {
            const nx = ix + dx;
            const ny = iy + dy;
            if (nx < 0 || ny < 0 || nx >= bw || ny >= bh) continue;
            const j = ny * bw + nx;
            if (mask[j] && !partLabels[j]) {
              partLabels[j] = parts;
              stack[top++] = j;
            }
          }
        }
      }
      const d = Math.hypot(roi.x0 + b.minX + sx / count + 0.5 - near.x, roi.y0 + b.minY + sy / count + 0.5 - near.y);
      if (d < bestDist) {
        bestDist = d;
        bestPart = parts;
        bestCount = count;
      }
    }
    if (bestPart === 0) return null;
    return { part: Uint8Array.from(partLabels, (v) => (v === bestPart ? 1 : 0)), count: bestCount };
  };

  let eroded: Uint8Array = original;
  for (let k = 0; k < depth; k++) eroded = morph(eroded, true);
  let chosen = nearestPart(eroded);
  let grow = depth + 1;
  // An eroded disk of radius r keeps about π(r − depth)² pixels; much more than that is not the ball alone.
  const alone = 1.5 * Math.PI * Math.max(1, radius - depth) ** 2;
  if (!chosen || chosen.count > alone) {
    levels.sort((a, c) => a - c);
    const cut = 0.5 * levels[Math.floor(levels.length * 0.98)]!;
    const strong = new Uint8Array(bw * bh);
    for (let y = 0; y < bh; y++) for (let x = 0; x < bw; x++) strong[y * bw + x] = original[y * bw + x] && diff[at(x, y)]! > cut ? 1 : 0;
    const part = nearestPart(strong);
    if (part && (!chosen || part.count < chosen.count)) {
      chosen = part;
      grow = 1;
    }
  }
  if (!chosen) return null;
  let grown = chosen.part;
  for (let k = 0; k < grow; k++) grown = morph(grown, false);
  const keep = new Uint8Array(labels.length);
  let count = 0;
  let sx = 0;
  let sy = 0;
  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (let y = 0; y < bh; y++) {
    for (let x = 0; x < bw; x++) {
      if (!grown[y * bw + x]) continue;
      keep[at(x, y)] = 1;
      if (!original[y * bw + x]) continue;
      count++;
      sx += x;
      sy += y;
      minX = Math.min(minX, x);
      maxX = Math.max(maxX, x);
      minY = Math.min(minY, y);
      maxY = Math.max(maxY, y);
    }
  }
  if (count === 0) return null;
  const x = roi.x0 + b.minX + sx / count + 0.5;
  const y = roi.y0 + b.minY + sy / count + 0.5;
  return { x, y, pixels: count, keep, reach: Math.hypot(maxX - minX + 1, maxY - minY + 1) / 2 + 2 };
}
