/**
 * Camera motion between two frames, from the background: a panning (and slightly rolling) phone
 * moves the whole picture, the ball and people move on their own. A grid of textured patches of
 * the first frame is found again in the second — a coarse search on 4× downscaled grey images, then
 * a fine one at full size with a sub-pixel parabola through the matching costs — and a rigid motion
 * (translation and rotation) is fitted to the patch displacements in closed form (2-D Procrustes,
 * Umeyama, IEEE TPAMI 13 (1991) 376), reweighted with Tukey's biweight so the patches on the ball
 * or on a walking player count for nothing (Huber & Ronchetti, Robust Statistics, 2009, ch. 7).
 * Patches are chosen where the image has texture in two directions (Shi & Tomasi, CVPR 1994), since
 * a patch of smooth sky or of a single line cannot be placed.
 */

/** A rigid motion p' = R(rotRad)·p + (tx, ty), pixels, p measured from the top-left corner. */
export interface Rigid {
  rotRad: number;
  tx: number;
  ty: number;
}

export interface CameraStep extends Rigid {
  /** Patches matched, and those agreeing with the fitted motion within 1.5 px. */
  patches: number;
  inliers: number;
}

export const IDENTITY: Rigid = { rotRad: 0, tx: 0, ty: 0 };

export function applyRigid(m: Rigid, x: number, y: number): { x: number; y: number } {
  const c = Math.cos(m.rotRad);
  const s = Math.sin(m.rotRad);
  return { x: c * x - s * y + m.tx, y: s * x + c * y + m.ty };
}

/** a after b: p ↦ a(b(p)). */
export function composeRigid(a: Rigid, b: Rigid): Rigid {
  const t = applyRigid(a, b.tx, b.ty);
  return { rotRad: a.rotRad + b.rotRad, tx: t.x, ty: t.y };
}

export function invertRigid(m: Rigid): Rigid {
  const c = Math.cos(-m.rotRad);
  const s = Math.sin(-m.rotRad);
  return { rotRad: -m.rotRad, tx: -(c * m.tx - s * m.ty), ty: -(s * m.tx + c * m.ty) };
}

/** 4× box-filtered copy of a grey image. */
export function downscale4(img: Uint8Array, width: number, height: number): { data: Uint8Array; width: number; height: number } {
  const w = width >> 2;
  const h = height >> 2;
  const out = new Uint8Array(w * h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      let sum = 0;
      for (let j = 0; j < 4; j++) {
        const row = (4 * y + j) * width + 4 * x;
        sum += img[row]! + img[row + 1]! + img[row + 2]! + img[row + 3]!;
      }
      out[y * w + x] = sum >> 4;
    }
  }
  return { data: out, width: w, height: h };
}

export interface StepOptions {
  /** Expected motion (the previous step): searches are centred on it. */
  guess?: Rigid;
  /** Discs to leave out (the ball where it is known), pixels of the first frame. */
  exclude?: Array<{ x: number; y: number; r: number }>;
  /** Largest motion from the guess, pixels per frame. Default: a tenth of the picture width, at least 16. */
  maxShiftPx?: number;
}

/** Sum of squared differences between a patch of a at (ax, ay) and of b at (bx, by), half-size h. */
function ssd(a: Uint8Array, b: Uint8Array, width: number, ax: number, ay: number, bx: number, by: number, h: number): number {
  let sum = 0;
  for (let j = -h; j <= h; j++) {
    const ra = (ay + j) * width + ax;
    const rb = (by + j) * width + bx;
    for (let i = -h; i <= h; i++) {
      const d = a[ra + i]! - b[rb + i]!;
      sum += d * d;
    }
  }
  return sum;
}

/** Smaller eigenvalue of the structure tensor over a patch: how well it can be placed in both directions. */
function cornerness(img: Uint8Array, width: number, cx: number, cy: number, h: number): number {
  let gxx = 0;
  let gyy = 0;
  let gxy = 0;
  for (let y = cy - h; y <= cy + h; y++) {
    for (let x = cx - h; x <= cx + h; x++) {
      const gx = (img[y * width + x + 1]! - img[y * width + x - 1]!) / 2;
      const gy = (img[(y + 1) * width + x]! - img[(y - 1) * width + x]!) / 2;
      gxx += gx * gx;
      gyy += gy * gy;
      gxy += gx * gy;
    }
  }
  const n = (2 * h + 1) ** 2;
  const tr = (gxx + gyy) / n;
  const det = (gxx * gyy - gxy * gxy) / (n * n);
  return tr / 2 - Math.sqrt(Math.max(0, (tr * tr) / 4 - det));
}

/** Sub-pixel offset of a minimum from three costs at −1, 0, +1. */
function parabola(m: number, c: number, p: number): number {
  const den = m - 2 * c + p;
  return den > 0 ? Math.max(-0.5, Math.min(0.5, (m - p) / (2 * den))) : 0;
}

/**
 * Estimates the camera motion from frame a to frame b: a background point at p in a is at
 * R(rotRad)·p + (tx, ty) in b. Needs at least 4 matched patches; otherwise returns the guess
 * with `patches` 0 (the caller decides whether to trust it).
 */
export function estimateCameraStep(a: Uint8Array, b: Uint8Array, width: number, height: number, options: StepOptions = {}): CameraStep {
  const guess = options.guess ?? IDENTITY;
  const half = Math.max(6, Math.round(Math.min(width, height) / 28));
  const small = { a: downscale4(a, width, height), b: downscale4(b, width, height) };
  const maxShift = options.maxShiftPx ?? Math.max(16, width / 10);
  const coarseReach = Math.ceil(maxShift / 4) + 1;
  const hs = Math.max(2, Math.round(half / 4));
  const matches: Array<{ x: number; y: number; u: number; v: number }> = [];
  const cols = 9;
  const rows = 6;
  const edge = half + 4;
  const minCorner = 4;
  for (let r = 0; r < rows; r++) {
    for (let q = 0; q < cols; q++) {
      const px = Math.round(edge + ((q + 0.5) * (width - 2 * edge)) / cols);
      const py = Math.round(edge + ((r + 0.5) * (height - 2 * edge)) / rows);
      if (options.exclude?.some((d) => Math.hypot(d.x - px, d.y - py) < d.r + 1.5 * half)) continue;
      if (cornerness(a, width, px, py, half) < minCorner) continue;
      const g = applyRigid(guess, px, py);
      // Coarse: integer search on the small images around the guessed position.
      const sx = Math.round(px / 4);
      const sy = Math.round(py / 4);
      const gx = Math.round(g.x / 4);
      const gy = Math.round(g.y / 4);
      let best = Infinity;
      let bu = 0;
      let bv = 0;
      for (let dv = -coarseReach; dv <= coarseReach; dv++) {
        for (let du = -coarseReach; du <= coarseReach; du++) {
          const tx = gx + du;
          const ty = gy + dv;
          if (tx - hs < 0 || ty - hs < 0 || tx + hs >= small.b.width || ty + hs >= small.b.height || sx - hs < 0 || sy - hs < 0) continue;
          const cost = ssd(small.a.data, small.b.data, small.a.width, sx, sy, tx, ty, hs);
          if (cost < best) {
            best = cost;
            bu = tx * 4 + (px - sx * 4);
            bv = ty * 4 + (py - sy * 4);
          }
        }
      }
      if (!Number.isFinite(best)) continue;
      // Fine: full size, ±4 px around the coarse match, then a parabola through the costs.
      let fbest = Infinity;
      let fx = 0;
      let fy = 0;
      const costAt = (x: number, y: number): number =>
        x - half - 1 < 0 || y - half - 1 < 0 || x + half + 1 >= width || y + half + 1 >= height ? Infinity : ssd(a, b, width, px, py, x, y, half);
      for (let dv = -4; dv <= 4; dv++) {
        for (let du = -4; du <= 4; du++) {
          const cost = costAt(bu + du, bv + dv);
          if (cost < fbest) {
            fbest = cost;
            fx = bu + du;
            fy = bv + dv;
          }
        }
      }
      if (!Number.isFinite(fbest)) continue;
      const cx = parabola(costAt(fx - 1, fy), fbest, costAt(fx + 1, fy));
      const cy = parabola(costAt(fx, fy - 1), fbest, costAt(fx, fy + 1));
      matches.push({ x: px, y: py, u: fx + (Number.isFinite(cx) ? cx : 0), v: fy + (Number.isFinite(cy) ? cy : 0) });
    }
  }
  if (matches.length < 4) return { ...guess, patches: 0, inliers: 0 };
  return { ...fitRigid(matches), patches: matches.length, inliers: countInliers(matches, fitRigid(matches)) };
}

/** Weighted closed-form rigid fit of p → q, reweighted with Tukey's biweight (c = 1.5 px after the first pass). */
export function fitRigid(matches: Array<{ x: number; y: number; u: number; v: number }>): Rigid {
  let w = matches.map(() => 1);
  // Start from the median translation, which ignores a minority of moving things.
  const med = (v: number[]): number => [...v].sort((p, q) => p - q)[v.length >> 1]!;
  let m: Rigid = { rotRad: 0, tx: med(matches.map((p) => p.u - p.x)), ty: med(matches.map((p) => p.v - p.y)) };
  for (let iter = 0; iter < 8; iter++) {
    const res = matches.map((p) => {
      const e = applyRigid(m, p.x, p.y);
      return Math.hypot(e.x - p.u, e.y - p.v);
    });
    const scale = iter === 0 ? Math.max(3, 3 * med(res)) : 1.5;
    w = res.map((r) => (r < scale ? (1 - (r / scale) ** 2) ** 2 : 0));
    const sw = w.reduce((s, v) => s + v, 0);
    if (sw < 1e-9) break;
    let mx = 0;
    let my = 0;
    let mu = 0;
    let mv = 0;
    matches.forEach((p, i) => {
      mx += w[i]! * p.x;
      my += w[i]! * p.y;
      mu += w[i]! * p.u;
      mv += w[i]! * p.v;
    });
    mx /= sw;
    my /= sw;
    mu /= sw;
    mv /= sw;
    let sCross = 0;
    let sDot = 0;
    matches.forEach((p, i) => {
      const ax = p.x - mx;
      const ay = p.y - my;
      const bx = p.u - mu;
      const by = p.v - mv;
      sDot += w[i]! * (ax * bx + ay * by);
      sCross += w[i]! * (ax * by - ay * bx);
    });
    const rot = Math.atan2(sCross, sDot);
    const c = Math.cos(rot);
    const s = Math.sin(rot);
    m = { rotRad: rot, tx: mu - (c * mx - s * my), ty: mv - (s * mx + c * my) };
  }
  return m;
}

function countInliers(matches: Array<{ x: number; y: number; u: number; v: number }>, m: Rigid): number {
  return matches.filter((p) => {
    const e = applyRigid(m, p.x, p.y);
    return Math.hypot(e.x - p.u, e.y - p.v) < 1.5;
  }).length;
}

/**
 * Follows the camera through a clip frame by frame and gives each frame's map to the first one
 * (the reference). Each frame is matched against the latest key frame rather than the frame before
 * it, and a new key frame is taken only when the view has moved a fifth of the picture or the
 * matches thin out, so errors add up over a handful of steps instead of over every frame.
 */
export class CameraTracker {
  private key: { data: Uint8Array; toRef: Rigid } | null = null;
  /** The frame before, for a second try when the key frame cannot be matched. */
  private prev: { data: Uint8Array; toRef: Rigid } | null = null;
  /** Motion from the key frame to the latest frame. */
  private fromKey: Rigid = IDENTITY;
  private lastStep: Rigid = IDENTITY;

  constructor(
    private readonly width: number,
    private readonly height: number,
  ) {}

  /**
   * Adds the next frame (a copy is kept when it becomes a key frame) and returns its map to the
   * reference frame's pixels, with the patches that agreed.
   * @param exclude discs of this frame to leave out (the ball where it is known).
   */
  push(frame: Uint8Array, exclude: StepOptions['exclude'] = []): { toRef: Rigid; inliers: number } {
    if (!this.key) {
      this.key = { data: Uint8Array.from(frame), toRef: IDENTITY };
      this.prev = { data: Uint8Array.from(frame), toRef: IDENTITY };
      return { toRef: IDENTITY, inliers: Infinity };
    }
    // Guess: the motion so far from the key frame, plus the last step once more.
    const guess = composeRigid(this.lastStep, this.fromKey);
    const toKey = invertRigid(guess);
    const keyExclude = exclude.map((d) => ({ ...applyRigid(toKey, d.x, d.y), r: d.r }));
    let step = estimateCameraStep(this.key.data, frame, this.width, this.height, { guess, exclude: keyExclude });
    let found: Rigid = step.inliers >= 6 ? step : guess;
    let toRef = composeRigid(this.key.toRef, invertRigid(found));
    if (step.inliers < 6 && this.prev) {
      // The key frame could not be matched: try the frame before, one step back.
      const retry = estimateCameraStep(this.prev.data, frame, this.width, this.height, { guess: this.lastStep, exclude });
      if (retry.inliers >= step.inliers) {
        step = retry;
        toRef = composeRigid(this.prev.toRef, invertRigid(retry.inliers >= 6 ? retry : this.lastStep));
        found = invertRigid(composeRigid(invertRigid(this.key.toRef), toRef));
      }
    }
    this.lastStep = composeRigid(found, invertRigid(this.fromKey));
    this.fromKey = found;
    const moved = Math.hypot(found.tx, found.ty) + Math.abs(found.rotRad) * this.width;
    if (moved > this.width / 5 || step.inliers < 12) {
      this.key = { data: Uint8Array.from(frame), toRef };
      this.fromKey = IDENTITY;
    }
    if (this.prev) this.prev.data.set(frame);
    else this.prev = { data: Uint8Array.from(frame), toRef };
    this.prev.toRef = toRef;
    return { toRef, inliers: step.inliers };
  }
}
