/**
 * Test and demo clips made by the project itself: a ball flying a simulated flight over a
 * textured, noisy playing-field scene, rendered frame by frame in memory and piped into ffmpeg,
 * with the true ball centre of every frame written beside the clip. Also the bad files the
 * upload checks must refuse.
 *
 * The flight here is a small stand-alone simulation (quadratic drag, classical RK4); it is not the
 * measurement engine in shared/physics/ and must not depend on it, so that tests of the follower
 * do not move when the engine changes.
 */
import { spawn } from 'node:child_process';
import { copyFile, mkdir, readFile, rm, stat, truncate, writeFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { mulberry32 } from '../../shared/physics';
import { ffmpegPath, lastErrorLine, runTool, toolCommand } from './tools';

/** Standard gravity, m/s² (3rd CGPM, 1901). */
const G = 9.80665;

export interface FlightClipSpec {
  width: number;
  height: number;
  /** Capture rate: the rate the simulated camera films at (frames per second). */
  captureFps: number;
  /** Rate written in the container; less than `captureFps` makes a slow-motion clip. Default: captureFps. */
  playbackFps?: number;
  durationS: number;
  /** Ball radius in pixels (drawn size, independent of the metre scale so small clips stay traceable). */
  ballRadiusPx: number;
  /** Scene scale, pixels per metre. Default: width / 36. */
  pxPerMetre?: number;
  /** Image position of the ground point under the launch, pixels. Defaults: x = 8 % of width, y = 85 % of height. */
  launchXPx?: number;
  groundYPx?: number;
  /** Launch height above the ground, m. Default 1. */
  launchHeightM?: number;
  /** Launch speed, m/s, and angle above the horizontal, degrees. Defaults 14 m/s, 45°. */
  speedMps?: number;
  angleDeg?: number;
  /** Time of launch in the clip, s; before it the ball rests at the launch point. Default 0.2. */
  launchTimeS?: number;
  /**
   * Drag factor k = ρ·C_d·A / (2m), 1/m, in a = −g·ŷ − k·|v|·v. Default 0.013 (roughly a size-5
   * football: ρ 1.2 kg/m³, C_d 0.25, A 0.038 m², m 0.43 kg).
   */
  dragPerMetre?: number;
  /** Standard deviation of the per-frame sensor noise, gray levels. Default 3. */
  noiseSigma?: number;
  /** Add moving and static clutter (a walking figure, goalposts, a resting second ball). Default true. */
  clutter?: boolean;
  /** Exposure as a fraction of the frame interval, for motion blur; 0 = sharp. Default 0.3. */
  exposure?: number;
  /** Seed of the noise and texture, for reproducible clips. Default 1. */
  seed?: number;
  /** libx264 quality and speed. Defaults CRF 18, preset veryfast. */
  crf?: number;
  preset?: string;
  /** A constant bit rate instead of a CRF, kbit/s, as phone cameras record (about 16 000 at 1080p60). */
  bitrateKbps?: number;
  /** Seconds between keyframes; phone cameras use about 1. Default: libx264's (up to 250 frames). */
  keyframeIntervalS?: number;
  /** Container rotation tag, degrees clockwise (the picture is stored turned back). Default 0. */
  rotationDeg?: 0 | 90 | 180 | 270;
  /**
   * A person walking across in front of the ball: their body's centre passes the ball's x at
   * `atS` seconds, walking at `speedPxPerS` (negative: to the left; default −120), `widthPx` wide
   * (default 4 ball diameters), standing from the ground to `topMarginPx` (default 3 ball radii)
   * above the ball at that instant. The ball is hidden wherever it overlaps them.
   */
  occluder?: { atS: number; widthPx?: number; speedPxPerS?: number; topMarginPx?: number };
  /**
   * A variable frame rate: frame i is filmed at i / captureFps + jitter·sin(i / 2) seconds (keep the
   * jitter under a quarter of the frame interval so times stay in order), and its timestamp says
   * so. The truth's `t` is that instant. Default 0 (a constant rate).
   */
  timestampJitterS?: number;
  /**
   * A camera turned to follow the ball: the picture is a window on a wider scene whose centre
   * moves `panPx` to the right over the clip (eased in and out), `tiltPx` down, while the camera
   * rolls by up to `rollDeg` (a half sine over the clip). Frame 0 is square and unmoved: it is the
   * reference frame, and the launch point and ground are given in its pixels.
   */
  pan?: { panPx: number; tiltPx?: number; rollDeg?: number };
  /**
   * A still camera turned `yawDeg` about the vertical from square to the plane of flight (the scene's launch,
   * ground and scale are given in the square-on picture the camera would take at 0°, whose centre it looks
   * at), with a rectangle of white bars standing in the plane on the ground, `fromXM` to `fromXM + widthM`
   * along the flight from the launch and `heightM` high. The truth then carries the rectangle's corners and
   * the ground under the launch in the frame's pixels (`FlightTruth.plane`). Not with `pan`.
   */
  tilt?: { yawDeg: number; rectangle: { fromXM: number; widthM: number; heightM: number } };
}

/** Maps a frame's pixels to the reference frame's: ref = R(rotRad)·(p − c) + c + (dx, dy), c the picture centre. */
export interface CameraToReference {
  dx: number;
  dy: number;
  rotRad: number;
}

export interface TruthFrame {
  frame: number;
  /** Seconds at the capture rate: the instant the frame was filmed. */
  t: number;
  /** True centre, pixels of the displayed picture. */
  x: number;
  y: number;
  /** The whole disk is inside the picture and no part of it is hidden by the occluder. */
  visible: boolean;
  /** Some part of the disk is behind the occluder (see `FlightClipSpec.occluder`). */
  occluded: boolean;
  /** No part of the ball can be seen: wholly outside the picture or wholly behind the occluder. */
  outOfView: boolean;
  /** After launch and before landing. */
  airborne: boolean;
  /** With a panning camera: the centre in the reference frame's pixels, and how this frame maps there. */
  xRef?: number;
  yRef?: number;
  camera?: CameraToReference;
}

export interface FlightTruth {
  width: number;
  height: number;
  captureFps: number;
  playbackFps: number;
  ballRadiusPx: number;
  launchFrame: number;
  /** First frame at or after the landing instant, or null when the ball lands after the clip. */
  landingFrame: number | null;
  frames: TruthFrame[];
  /** With a tilted camera: the rectangle's corners (bottom left, bottom right, top right, top left) and the ground under the launch, frame pixels. */
  plane?: { corners: Array<{ x: number; y: number }>; widthM: number; heightM: number; origin: { x: number; y: number } };
}

export interface RenderedClip {
  videoPath: string;
  truthPath: string;
  truth: FlightTruth;
}

/** Smooth value noise in [0, 1] on a lattice of `cell` pixels (bilinear, smoothstep-eased). */
function valueNoise(seed: number, cell: number): (x: number, y: number) => number {
  const r = mulberry32(seed);
  const size = 256;
  const lattice = new Float32Array(size * size).map(() => r());
  const at = (i: number, j: number): number => lattice[(((j % size) + size) % size) * size + (((i % size) + size) % size)]!;
  return (x, y) => {
    const fx = x / cell;
    const fy = y / cell;
    const i = Math.floor(fx);
    const j = Math.floor(fy);
    let u = fx - i;
    let v = fy - j;
    u = u * u * (3 - 2 * u);
    v = v * v * (3 - 2 * v);
    const a = at(i, j) + (at(i + 1, j) - at(i, j)) * u;
    const b = at(i, j + 1) + (at(i + 1, j + 1) - at(i, j + 1)) * u;
    return a + (b - a) * v;
  };
}

/**
 * Flight with quadratic drag, a = −g·ŷ − k·|v|·v (Taylor, Classical Mechanics, 2005, §2.4),
 * integrated with the classical fourth-order Runge–Kutta method (Kutta, Z. Math. Phys. 46 (1901)
 * 435) at a fixed small step, sampled for interpolation.
 */
function simulateFlight(v0: number, angleRad: number, h0: number, k: number, dt: number, maxT: number) {
  const ts: number[] = [0];
  const xs: number[] = [0];
  const ys: number[] = [h0];
  let s = [0, h0, v0 * Math.cos(angleRad), v0 * Math.sin(angleRad)];
  const f = (q: number[]): number[] => {
    const speed = Math.hypot(q[2]!, q[3]!);
    return [q[2]!, q[3]!, -k * speed * q[2]!, -G - k * speed * q[3]!];
  };
  let t = 0;
  let landingT: number | null = null;
  while (t < maxT) {
    const k1 = f(s);
    const k2 = f(s.map((v, i) => v + (dt / 2) * k1[i]!));
    const k3 = f(s.map((v, i) => v + (dt / 2) * k2[i]!));
    const k4 = f(s.map((v, i) => v + dt * k3[i]!));
    const next = s.map((v, i) => v + (dt / 6) * (k1[i]! + 2 * k2[i]! + 2 * k3[i]! + k4[i]!));
    if (next[1]! <= 0) {
      // Landing between two steps: place it by linear interpolation of the height.
      const frac = s[1]! / (s[1]! - next[1]!);
      landingT = t + frac * dt;
      ts.push(landingT);
      xs.push(s[0]! + frac * (next[0]! - s[0]!));
      ys.push(0);
      break;
    }
    s = next;
    t += dt;
    ts.push(t);
    xs.push(s[0]!);
    ys.push(s[1]!);
  }
  const position = (time: number): [number, number] => {
    if (time <= 0) return [0, h0];
    if (time >= ts[ts.length - 1]!) return [xs[xs.length - 1]!, ys[ys.length - 1]!];
    const i = Math.min(ts.length - 2, Math.floor(time / dt));
    const a = (time - ts[i]!) / (ts[i + 1]! - ts[i]!);
    return [xs[i]! + a * (xs[i + 1]! - xs[i]!), ys[i]! + a * (ys[i + 1]! - ys[i]!)];
  };
  return { position, landingT };
}

interface Scene {
  rgb: Uint8ClampedArray;
  width: number;
  height: number;
}

/** The static part of the picture: sky, tree line, mown grass, a touchline, goalposts, a resting ball. */
function paintScene(width: number, height: number, groundY: number, seed: number, clutter: boolean): Scene {
  const rgb = new Uint8ClampedArray(width * height * 3);
  const horizon = Math.round(height * 0.42);
  const clouds = valueNoise(seed + 11, Math.max(8, width / 10));
  const trees = valueNoise(seed + 23, Math.max(4, width / 40));
  const grain = valueNoise(seed + 37, Math.max(2, width / 300));
  const stripe = Math.max(8, Math.round(width / 12));
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const p = (y * width + x) * 3;
      let r: number, g: number, b: number;
      const treeTop = horizon - (0.02 + 0.05 * trees(x, 0)) * height;
      if (y < treeTop) {
        const a = y / horizon;
        const c = Math.max(0, clouds(x, y) - 0.55) * 2.2;
        r = 120 + 70 * a + 100 * c;
        g = 165 + 50 * a + 80 * c;
        b = 215 + 25 * a + 30 * c;
      } else if (y < horizon) {
        const t = grain(x, y);
        r = 40 + 25 * t;
        g = 70 + 35 * t;
        b = 40 + 15 * t;
      } else {
        const band = Math.floor(x / stripe) % 2 === 0 ? 10 : -6;
        const t = grain(x * 1.3, y * 2.1) - 0.5;
        r = 70 + band + 30 * t;
        g = 128 + band + 45 * t;
        b = 58 + band * 0.5 + 20 * t;
      }
      rgb[p] = r;
      rgb[p + 1] = g;
      rgb[p + 2] = b;
    }
  }
  const fill = (x0: number, y0: number, x1: number, y1: number, c: [number, number, number]): void => {
    for (let y = Math.max(0, Math.round(y0)); y < Math.min(height, Math.round(y1)); y++) {
      for (let x = Math.max(0, Math.round(x0)); x < Math.min(width, Math.round(x1)); x++) {
        const p = (y * width + x) * 3;
        rgb[p] = c[0];
        rgb[p + 1] = c[1];
        rgb[p + 2] = c[2];
      }
    }
  };
  const line = Math.max(1, Math.round(height / 200));
  fill(0, groundY + 3 * line, width, groundY + 4 * line + 1, [225, 228, 220]);
  if (clutter) {
    // Goalposts: white like the ball, static; the background model must see them as background.
    const post = Math.max(2, Math.round(width / 180));
    const topY = horizon - 0.22 * height;
    for (const gx of [0.86 * width, 0.95 * width]) fill(gx, topY, gx + post, groundY + 2 * line, [236, 236, 230]);
    fill(0.86 * width, topY + 0.1 * height, 0.95 * width + post, topY + 0.1 * height + post, [236, 236, 230]);
    // A second ball resting on the grass.
    const rr = Math.max(3, Math.round(width / 110));
    const cx = 0.52 * width;
    const cy = groundY + 0.06 * height;
    for (let y = Math.floor(cy - rr - 1); y <= cy + rr + 1; y++) {
      for (let x = Math.floor(cx - rr - 1); x <= cx + rr + 1; x++) {
        if (x < 0 || y < 0 || x >= width || y >= height) continue;
        const cover = Math.min(1, Math.max(0, rr + 0.5 - Math.hypot(x - cx, y - cy)));
        const p = (y * width + x) * 3;
        rgb[p] = rgb[p]! * (1 - cover) + 230 * cover;
        rgb[p + 1] = rgb[p + 1]! * (1 - cover) + 228 * cover;
        rgb[p + 2] = rgb[p + 2]! * (1 - cover) + 215 * cover;
      }
    }
  }
  return { rgb, width, height };
}

/** A figure walking slowly along the ground: motion the follower must not mistake for the ball. */
function paintWalker(frame: Uint8ClampedArray, width: number, height: number, groundY: number, t: number, duration: number): void {
  const bodyW = Math.max(4, Math.round(width * 0.018));
  const bodyH = Math.max(10, Math.round(height * 0.13));
  const x0 = Math.round(width * (0.3 + 0.25 * (t / Math.max(duration, 1e-9))));
  const y1 = Math.round(groundY + 2);
  const y0 = y1 - bodyH;
  for (let y = Math.max(0, y0); y < Math.min(height, y1); y++) {
    for (let x = Math.max(0, x0); x < Math.min(width, x0 + bodyW); x++) {
      const p = (y * width + x) * 3;
      frame[p] = 40;
      frame[p + 1] = 55;
      frame[p + 2] = 110;
    }
  }
  const hr = bodyW * 0.55;
  const hx = x0 + bodyW / 2;
  const hy = y0 - hr;
  for (let y = Math.floor(hy - hr); y <= hy + hr; y++) {
    for (let x = Math.floor(hx - hr); x <= hx + hr; x++) {
      if (x < 0 || y < 0 || x >= width || y >= height || Math.hypot(x - hx, y - hy) > hr) continue;
      const p = (y * width + x) * 3;
      frame[p] = 170;
      frame[p + 1] = 125;
      frame[p + 2] = 95;
    }
  }
}

interface Occluder {
  x0: number;
  x1: number;
  y0: number;
  y1: number;
}

/** The occluding figure's box at time t, or null without one. */
function occluderAt(spec: FlightClipSpec, centreAt: (t: number) => [number, number], groundY: number, t: number): Occluder | null {
  const o = spec.occluder;
  if (!o) return null;
  const r = spec.ballRadiusPx;
  const [bx, by] = centreAt(o.atS);
  const w = o.widthPx ?? 8 * r;
  const cx = bx + (o.speedPxPerS ?? -120) * (t - o.atS);
  return { x0: cx - w / 2, x1: cx + w / 2, y0: by - r - (o.topMarginPx ?? 3 * r), y1: groundY + 2 };
}

/** Paints the occluding figure: a dark, slightly textured body (in front of the ball). */
function paintOccluder(frame: Uint8ClampedArray, width: number, height: number, box: Occluder): void {
  for (let y = Math.max(0, Math.floor(box.y0)); y < Math.min(height, Math.ceil(box.y1)); y++) {
    for (let x = Math.max(0, Math.floor(box.x0)); x < Math.min(width, Math.ceil(box.x1)); x++) {
      const p = (y * width + x) * 3;
      const stripe = ((y >> 2) & 1) * 12;
      frame[p] = 150 + stripe;
      frame[p + 1] = 45 + stripe;
      frame[p + 2] = 50;
    }
  }
}

/**
 * Takes the camera's picture from the world canvas: `at(px, py)` gives the world position (continuous
 * coordinates) that the frame's pixel centre (px, py) shows; colours are interpolated bilinearly.
 */
function resample(
  src: Uint8ClampedArray,
  sw: number,
  sh: number,
  dst: Uint8ClampedArray,
  width: number,
  height: number,
  at: (px: number, py: number) => [number, number],
): void {
  for (let v = 0; v < height; v++) {
    for (let u = 0; u < width; u++) {
      const [mx, my] = at(u + 0.5, v + 0.5);
      const wx = Math.min(sw - 1.001, Math.max(0, mx - 0.5));
      const wy = Math.min(sh - 1.001, Math.max(0, my - 0.5));
      const ix = Math.floor(wx);
      const iy = Math.floor(wy);
      const fx = wx - ix;
      const fy = wy - iy;
      const p00 = (iy * sw + ix) * 3;
      const p10 = p00 + 3;
      const p01 = p00 + sw * 3;
      const p11 = p01 + 3;
      const q = (v * width + u) * 3;
      for (let k = 0; k < 3; k++) {
        const a = src[p00 + k]! + (src[p10 + k]! - src[p00 + k]!) * fx;
        const b = src[p01 + k]! + (src[p11 + k]! - src[p01 + k]!) * fx;
        dst[q + k] = a + (b - a) * fy;
      }
    }
  }
}

/** A panning camera's frame pixel → world: R(rot)·(p − c) + c + (dx, dy) + (x0, y0), c the picture centre. */
function rigidToWorld(cam: CameraToReference, width: number, height: number, x0: number, y0: number): (px: number, py: number) => [number, number] {
  const c = Math.cos(cam.rotRad);
  const s = Math.sin(cam.rotRad);
  const ox = x0 + cam.dx + width / 2;
  const oy = y0 + cam.dy + height / 2;
  return (px, py) => {
    const rx = px - width / 2;
    const ry = py - height / 2;
    return [c * rx - s * ry + ox, s * rx + c * ry + oy];
  };
}

/**
 * A pinhole camera (Hartley & Zisserman, "Multiple View Geometry in Computer Vision", 2nd ed., 2004, §6.1)
 * of focal length f pixels, turned θ about the vertical from square to the plane of flight and looking at
 * the point that the square-on picture shows at its centre c, from the distance at which that picture's
 * scale holds there at θ = 0. With p = x − cₓ, q = y − c_y in the frame and (X, Y) the square-on picture's
 * pixels: X − cₓ = f·p / (p·sin θ + f·cos θ), Y − c_y = f·cos θ·q / (p·sin θ + f·cos θ), a homography.
 */
function tiltedCamera(yawDeg: number, width: number, height: number) {
  const t = (yawDeg * Math.PI) / 180;
  const sin = Math.sin(t);
  const cos = Math.cos(t);
  const f = width;
  const cx = width / 2;
  const cy = height / 2;
  return {
    /** Frame pixel → the square-on picture's pixel. */
    toPlane(x: number, y: number): [number, number] {
      const p = x - cx;
      const w = p * sin + f * cos;
      return [cx + (f * p) / w, cy + (f * cos * (y - cy)) / w];
    },
    /** The square-on picture's pixel → frame pixel (the inverse, solved for p then q). */
    toFrame(X: number, Y: number): [number, number] {
      const P = X - cx;
      const p = (P * f * cos) / (f - P * sin);
      const w = p * sin + f * cos;
      return [cx + p, cy + ((Y - cy) * w) / (f * cos)];
    },
  };
}

/** A rectangle of white bars (bottom line, two posts, top bar) centred on the given corners of the world canvas. */
function paintRectangle(scene: Scene, left: number, right: number, bottom: number, top: number, bar: number): void {
  const { rgb, width, height } = scene;
  const fill = (x0: number, y0: number, x1: number, y1: number): void => {
    for (let y = Math.max(0, Math.round(y0)); y < Math.min(height, Math.round(y1)); y++) {
      for (let x = Math.max(0, Math.round(x0)); x < Math.min(width, Math.round(x1)); x++) {
        const p = (y * width + x) * 3;
        rgb[p] = 238;
        rgb[p + 1] = 238;
        rgb[p + 2] = 232;
      }
    }
  };
  const h = bar / 2;
  fill(left - h, bottom - h, right + h, bottom + h);
  fill(left - h, top - h, right + h, top + h);
  fill(left - h, top - h, left + h, bottom + h);
  fill(right - h, top - h, right + h, bottom + h);
}

function add([x, y]: [number, number], dx: number, dy: number): [number, number] {
  return [x + dx, y + dy];
}

/** Whether a disk of radius r at (x, y) lies wholly inside the box. */
function diskInside(box: Occluder | null, x: number, y: number, r: number): boolean {
  return !!box && x - r >= box.x0 && x + r <= box.x1 && y - r >= box.y0 && y + r <= box.y1;
}

/** Whether a disk of radius r at (x, y) overlaps the box. */
function diskTouches(box: Occluder | null, x: number, y: number, r: number): boolean {
  if (!box) return false;
  const dx = Math.max(box.x0 - x, 0, x - box.x1);
  const dy = Math.max(box.y0 - y, 0, y - box.y1);
  return Math.hypot(dx, dy) < r + 0.5;
}

/**
 * Draws the ball as a shaded disk with anti-aliased edges, averaged over the positions it takes
 * during the exposure (motion blur). Coverage of an edge pixel is approximated by the distance of
 * its centre to the rim, clamped to [0, 1].
 */
function paintBall(frame: Uint8ClampedArray, width: number, height: number, centres: Array<[number, number]>, r: number): void {
  let minX = Infinity;
  let minY = Infinity;
  let maxX = -Infinity;
  let maxY = -Infinity;
  for (const [cx, cy] of centres) {
    minX = Math.min(minX, cx);
    maxX = Math.max(maxX, cx);
    minY = Math.min(minY, cy);
    maxY = Math.max(maxY, cy);
  }
  const x0 = Math.max(0, Math.floor(minX - r - 1));
  const x1 = Math.min(width - 1, Math.ceil(maxX + r + 1));
  const y0 = Math.max(0, Math.floor(minY - r - 1));
  const y1 = Math.min(height - 1, Math.ceil(maxY + r + 1));
  if (x0 > x1 || y0 > y1) return;
  const n = centres.length;
  // Light from upper left and in front: a bright side and a darker rim, as on a real ball.
  const lx = -0.45;
  const ly = -0.55;
  const lz = Math.sqrt(1 - lx * lx - ly * ly);
  for (let y = y0; y <= y1; y++) {
    for (let x = x0; x <= x1; x++) {
      let alpha = 0;
      let shade = 0;
      for (const [cx, cy] of centres) {
        const dx = x + 0.5 - cx;
        const dy = y + 0.5 - cy;
        const d = Math.hypot(dx, dy);
        const cover = Math.min(1, Math.max(0, r + 0.5 - d));
        if (cover <= 0) continue;
        const nx = dx / r;
        const ny = dy / r;
        const nz = Math.sqrt(Math.max(0, 1 - nx * nx - ny * ny));
        const lambert = Math.max(0, nx * lx + ny * ly + nz * lz);
        alpha += cover;
        shade += cover * (0.62 + 0.38 * lambert);
      }
      if (alpha <= 0) continue;
      const a = alpha / n;
      const s = shade / alpha;
      const p = (y * width + x) * 3;
      frame[p] = frame[p]! * (1 - a) + 250 * s * a;
      frame[p + 1] = frame[p + 1]! * (1 - a) + 248 * s * a;
      frame[p + 2] = frame[p + 2]! * (1 - a) + 238 * s * a;
    }
  }
}

/**
 * Renders a flight clip to `videoPath` (H.264 in MP4) and its truth to `videoPath` + `.truth.json`.
 * Frame i is filmed at t = i / captureFps; the true centre is the ball's position at that instant
 * (the middle of the exposure).
 */
export async function renderFlightClip(videoPath: string, spec: FlightClipSpec): Promise<RenderedClip> {
  const { width, height, captureFps, durationS, ballRadiusPx: radius } = spec;
  if (width % 2 || height % 2) throw new Error(`Clip size must be even for yuv420p (got ${width}×${height}).`);
  const playbackFps = spec.playbackFps ?? captureFps;
  const scale = spec.pxPerMetre ?? width / 36;
  const launchX = spec.launchXPx ?? width * 0.08;
  const groundY = spec.groundYPx ?? height * 0.85;
  const launchT = spec.launchTimeS ?? 0.2;
  const exposure = spec.exposure ?? 0.3;
  const noiseSigma = spec.noiseSigma ?? 3;
  const seed = spec.seed ?? 1;
  const clutter = spec.clutter ?? true;
  const frameCount = Math.round(durationS * captureFps);
  const jitter = spec.timestampJitterS ?? 0;
  const filmedAt = (i: number): number => i / captureFps + jitter * Math.sin(i / 2);
  const flight = simulateFlight(
    spec.speedMps ?? 14,
    ((spec.angleDeg ?? 45) * Math.PI) / 180,
    spec.launchHeightM ?? 1,
    spec.dragPerMetre ?? 0.013,
    1 / (captureFps * 16),
    durationS + 1,
  );
  // With a panning camera everything is drawn on a wider world canvas; (x0, y0) is where the
  // reference frame's top-left corner sits on it.
  const pan = spec.pan;
  const panPx = pan?.panPx ?? 0;
  const tiltPx = pan?.tiltPx ?? 0;
  const roll = ((pan?.rollDeg ?? 0) * Math.PI) / 180;
  // A tilted camera sees more of the plane on its far side: the world canvas covers what the frame's corners show.
  const tilt = spec.tilt ? tiltedCamera(spec.tilt.yawDeg, width, height) : null;
  if (tilt && pan) throw new Error('A test clip can have a panning or a tilted camera, not both.');
  const seen = tilt ? [tilt.toPlane(0, 0), tilt.toPlane(width, 0), tilt.toPlane(0, height), tilt.toPlane(width, height)] : [];
  const seenX = seen.map(([x]) => x);
  const seenY = seen.map(([, y]) => y);
  const margin = pan ? Math.ceil(Math.abs(roll) * width * 0.6 + 8) : tilt ? 8 : 0;
  const reach = tilt
    ? { left: Math.ceil(Math.max(0, -Math.min(...seenX))), right: Math.ceil(Math.max(width, ...seenX)) - width, up: Math.ceil(Math.max(0, -Math.min(...seenY))), down: Math.ceil(Math.max(height, ...seenY)) - height }
    : { left: Math.max(0, -panPx), right: Math.max(0, panPx), up: Math.max(0, -tiltPx), down: Math.max(0, tiltPx) };
  const worldW = width + Math.ceil(reach.left + reach.right) + 2 * margin;
  const worldH = height + Math.ceil(reach.up + reach.down) + 2 * margin;
  const x0 = margin + reach.left;
  const y0 = margin + reach.up;
  const cameraAt = (t: number): CameraToReference => {
    const u = Math.min(1, Math.max(0, t / durationS));
    const ease = u * u * (3 - 2 * u);
    return { dx: panPx * ease, dy: tiltPx * ease, rotRad: roll * Math.sin(Math.PI * u) };
  };
  const centreAt = (t: number): [number, number] => {
    const [xm, ym] = flight.position(t - launchT);
    return [x0 + launchX + xm * scale, y0 + groundY - ym * scale];
  };
  /** World position → this frame's pixels. */
  const toFrame = (cam: CameraToReference, wx: number, wy: number): [number, number] => {
    const rx = wx - x0 - cam.dx - width / 2;
    const ry = wy - y0 - cam.dy - height / 2;
    const c = Math.cos(cam.rotRad);
    const s = Math.sin(cam.rotRad);
    return [c * rx + s * ry + width / 2, -s * rx + c * ry + height / 2];
  };

  const world = paintScene(worldW, worldH, y0 + groundY, seed, clutter);
  const rect = spec.tilt?.rectangle;
  if (rect) {
    const left = x0 + launchX + rect.fromXM * scale;
    paintRectangle(world, left, left + rect.widthM * scale, y0 + groundY, y0 + groundY - rect.heightM * scale, Math.max(3, Math.round(0.12 * scale)));
  }
  const drawn = pan || tilt;
  const scene = drawn ? { rgb: new Uint8ClampedArray(width * height * 3), width, height } : world;
  // Sensor noise: a table of roughly normal values (sum of four uniforms), read at a fresh random
  // offset each frame so the noise moves from frame to frame without a random draw per pixel.
  const rand = mulberry32(seed * 7919 + 1);
  const noiseLen = 1 << 20;
  const noise = new Int8Array(noiseLen);
  const spread = noiseSigma * Math.sqrt(3);
  for (let i = 0; i < noiseLen; i++) noise[i] = Math.round(((rand() + rand() + rand() + rand() - 2) / 2) * spread * 2);

  await mkdir(dirname(videoPath), { recursive: true });
  const args = [
    '-v', 'error', '-nostdin', '-y',
    '-f', 'rawvideo', '-pix_fmt', 'rgb24', '-s', `${width}x${height}`, '-framerate', String(playbackFps), '-i', 'pipe:0',
    '-c:v', 'libx264', '-preset', spec.preset ?? 'veryfast', '-pix_fmt', 'yuv420p',
  ];
  if (spec.bitrateKbps) {
    const k = Math.round(spec.bitrateKbps);
    args.push('-b:v', `${k}k`, '-maxrate', `${k}k`, '-bufsize', `${2 * k}k`);
  } else {
    args.push('-crf', String(spec.crf ?? 18));
  }
  // Without B-frames, packets come in presentation order, so the timestamps can be rewritten per packet below.
  if (jitter) args.push('-bf', '0', '-video_track_timescale', '90000');
  if (spec.keyframeIntervalS) args.push('-g', String(Math.max(1, Math.round(spec.keyframeIntervalS * playbackFps))));
  const rotation = spec.rotationDeg ?? 0;
  // Note: the picture is stored turned back and then tagged, so that a player (and ffmpeg's
  // autorotate) shows the scene upright; the truth is in displayed pixels. ffmpeg 5.1 drops a
  // `rotate` tag given while encoding, so the tag is added by a second, copying pass; its mov muxer
  // then writes a display matrix that turns the picture counter-clockwise by the tag's angle.
  const turnBack = { 90: 'transpose=cclock', 180: 'hflip,vflip', 270: 'transpose=clock' } as const;
  const tagFor = { 90: '270', 180: '180', 270: '90' } as const;
  const encodedPath = rotation === 0 && !jitter ? videoPath : `${videoPath}.encoded.mp4`;
  if (rotation !== 0) args.push('-vf', turnBack[rotation]);
  args.push('-movflags', '+faststart', encodedPath);
  const child = spawn(...toolCommand(ffmpegPath(), args), { stdio: ['pipe', 'ignore', 'pipe'] });
  let stderr = '';
  child.stderr.setEncoding('utf8');
  child.stderr.on('data', (d: string) => {
    stderr = (stderr + d).slice(-8000);
  });
  const exited = new Promise<number | null>((res, rej) => {
    child.on('error', rej);
    child.on('close', (code) => res(code));
  });
  const write = (buf: Uint8ClampedArray): Promise<void> =>
    new Promise((res, rej) => {
      const ok = child.stdin.write(Buffer.from(buf.buffer, buf.byteOffset, buf.byteLength), (err) => (err ? rej(err) : undefined));
      if (ok) res();
      else child.stdin.once('drain', res);
    });

  const frames: TruthFrame[] = [];
  const frame = new Uint8ClampedArray(scene.rgb.length);
  const canvas = drawn ? new Uint8ClampedArray(world.rgb.length) : frame;
  const subSamples = exposure > 0 ? 9 : 1;
  const frameInterval = 1 / captureFps;
  let flicker = 0;
  for (let i = 0; i < frameCount; i++) {
    const t = filmedAt(i);
    canvas.set(world.rgb);
    if (clutter) paintWalker(canvas, worldW, worldH, y0 + groundY, t, durationS);
    const centres: Array<[number, number]> = [];
    for (let s = 0; s < subSamples; s++) {
      const dt = subSamples === 1 ? 0 : (s / (subSamples - 1) - 0.5) * exposure * frameInterval;
      centres.push(centreAt(t + dt));
    }
    paintBall(canvas, worldW, worldH, centres, radius);
    const box = occluderAt(spec, centreAt, y0 + groundY, t);
    if (box) paintOccluder(canvas, worldW, worldH, box);
    const cam = cameraAt(t);
    if (pan) resample(canvas, worldW, worldH, frame, width, height, rigidToWorld(cam, width, height, x0, y0));
    else if (tilt) resample(canvas, worldW, worldH, frame, width, height, (px, py) => add(tilt.toPlane(px, py), x0, y0));
    flicker = Math.max(-2, Math.min(2, flicker + (rand() - 0.5)));
    const offset = Math.floor(rand() * noiseLen);
    const mask = noiseLen - 1;
    const f = Math.round(flicker);
    for (let p = 0, q = 0; p < frame.length; p += 3, q++) {
      const nv = noise[(q + offset) & mask]! + f;
      frame[p] = frame[p]! + nv;
      frame[p + 1] = frame[p + 1]! + nv;
      frame[p + 2] = frame[p + 2]! + nv;
    }
    await write(frame);
    const [wx, wy] = centreAt(t);
    const [x, y] = pan ? toFrame(cam, wx, wy) : tilt ? tilt.toFrame(wx - x0, wy - y0) : [wx, wy];
    const sinceLaunch = t - launchT;
    const occluded = diskTouches(box, wx, wy, radius);
    frames.push({
      frame: i,
      t,
      x,
      y,
      visible: !occluded && x - radius >= 0 && y - radius >= 0 && x + radius <= width && y + radius <= height,
      occluded,
      ...(pan ? { xRef: wx - x0, yRef: wy - y0, camera: cam } : {}),
      outOfView: diskInside(box, wx, wy, radius) || x + radius <= 0 || y + radius <= 0 || x - radius >= width || y - radius >= height,
      airborne: sinceLaunch > 0 && (flight.landingT === null || sinceLaunch < flight.landingT),
    });
  }
  child.stdin.end();
  const code = await exited;
  if (code !== 0) throw new Error(`ffmpeg failed to encode the test clip: ${lastErrorLine(stderr)}`);
  if (encodedPath !== videoPath) {
    const copyArgs = ['-v', 'error', '-nostdin', '-y', '-i', encodedPath, '-c', 'copy'];
    if (rotation !== 0) copyArgs.push('-metadata:s:v:0', `rotate=${tagFor[rotation]}`);
    if (jitter) {
      // Playback seconds of the jitter: the filmed instants scaled from capture to playback rate.
      const shift = `round(${jitter * (captureFps / playbackFps)}*sin(N/2)/TB)`;
      copyArgs.push('-bsf:v', `setts=pts='PTS+${shift}':dts='DTS+${shift}'`);
    }
    const res = await runTool(ffmpegPath(), [...copyArgs, '-movflags', '+faststart', videoPath]);
    await rm(encodedPath, { force: true });
    if (res.code !== 0) throw new Error(`ffmpeg failed to tag or retime the test clip: ${lastErrorLine(res.stderr)}`);
  }

  const landingFrame = flight.landingT === null ? null : Math.ceil((launchT + flight.landingT) * captureFps);
  const truth: FlightTruth = {
    width,
    height,
    captureFps,
    playbackFps,
    ballRadiusPx: radius,
    launchFrame: Math.ceil(launchT * captureFps),
    landingFrame: landingFrame !== null && landingFrame < frameCount ? landingFrame : null,
    frames,
  };
  if (tilt && rect) {
    const at = (xm: number, ym: number) => {
      const [x, y] = tilt.toFrame(launchX + xm * scale, groundY - ym * scale);
      return { x, y };
    };
    const right = rect.fromXM + rect.widthM;
    truth.plane = {
      corners: [at(rect.fromXM, 0), at(right, 0), at(right, rect.heightM), at(rect.fromXM, rect.heightM)],
      widthM: rect.widthM,
      heightM: rect.heightM,
      origin: at(0, 0),
    };
  }
  const truthPath = `${videoPath}.truth.json`;
  await writeFile(truthPath, JSON.stringify(truth));
  return { videoPath, truthPath, truth };
}

/** Reads a truth file written by `renderFlightClip`. */
export async function readTruth(truthPath: string): Promise<FlightTruth> {
  return JSON.parse(await readFile(truthPath, 'utf8')) as FlightTruth;
}

export interface BadFiles {
  /** Plain text with a video's name. */
  textAsMp4: string;
  /** Zero bytes. */
  empty: string;
  /** An MP4 with its index up front, cut in the middle of its media data. */
  truncatedMp4: string;
  /** An MP4 with its index at the end, cut before the index. */
  truncatedNoIndex: string;
  /** An MP4 holding sound only. */
  audioOnly: string;
  /** An MP4 whose video sample entry names a codec no decoder knows. */
  unknownCodec: string;
  /** A PNG still named as a video. */
  imageAsVideo: string;
  /** Three frames, the third of another size. */
  mixedSizeFrames: string[];
  /** Three good frames of one size (PNG). */
  goodFrames: string[];
  /** A JPEG frame among PNG frames of the same size. */
  mixedTypeFrames: string[];
  /** An MP4 in which one frame is stamped a second before the frames around it. */
  backwardsTimestamps: string;
  /** An MP4 whose timestamps jump half a second after frame 20 and repeat at frame 30. */
  jumpyTimestamps: string;
}

/** Makes every kind of bad upload in `dir` (created when missing). Needs ffmpeg; takes about a second. */
export async function makeBadFiles(dir: string): Promise<BadFiles> {
  await mkdir(dir, { recursive: true });
  const ff = async (args: string[]): Promise<void> => {
    const res = await runTool(ffmpegPath(), ['-v', 'error', '-nostdin', '-y', ...args]);
    if (res.code !== 0) throw new Error(`ffmpeg failed making a bad test file: ${lastErrorLine(res.stderr)}`);
  };
  const p = (name: string): string => join(dir, name);

  await writeFile(p('notes.mp4'), 'Fennick Vale training notes\nThis is not a video.\n');
  await writeFile(p('empty.mp4'), '');

  const src = ['-f', 'lavfi', '-i', 'testsrc=size=160x120:rate=25', '-t', '2'];
  await ff([...src, '-c:v', 'libx264', '-preset', 'ultrafast', '-pix_fmt', 'yuv420p', '-movflags', '+faststart', p('whole-faststart.mp4')]);
  await copyFile(p('whole-faststart.mp4'), p('cut.mp4'));
  await truncate(p('cut.mp4'), Math.floor((await stat(p('cut.mp4'))).size * 0.6));
  await ff([...src, '-c:v', 'libx264', '-preset', 'ultrafast', '-pix_fmt', 'yuv420p', p('whole-index-last.mp4')]);
  await copyFile(p('whole-index-last.mp4'), p('cut-no-index.mp4'));
  await truncate(p('cut-no-index.mp4'), Math.floor((await stat(p('cut-no-index.mp4'))).size * 0.7));

  await ff(['-f', 'lavfi', '-i', 'sine=frequency=440:duration=1', '-c:a', 'aac', p('sound-only.mp4')]);

  // Timestamps rewritten on a stream copy (the picture has no B-frames: packet N is frame N). The
  // decode times stay in order, as muxers insist, while one presentation time goes back a second.
  await ff(['-i', p('whole-faststart.mp4'), '-c', 'copy', '-bsf:v', "setts=pts='if(eq(N,15),PTS-round(1/TB),PTS)':dts='DTS-round(1.5/TB)'", p('backwards.mp4')]);
  await ff([
    '-i', p('whole-faststart.mp4'), '-c', 'copy',
    '-bsf:v', "setts=pts='PTS+if(gte(N,20),round(0.5/TB),0)-if(eq(N,30),round(0.04/TB),0)':dts='DTS+if(gte(N,20),round(0.5/TB),0)-if(eq(N,30),round(0.04/TB),0)'",
    p('jumpy.mp4'),
  ]);

  // Rename the sample entry `avc1` inside `stsd` to a code no decoder knows: the container stays
  // valid, the stream's codec becomes unreadable.
  const whole = await readFile(p('whole-faststart.mp4'));
  const stsd = whole.indexOf('stsd', 0, 'latin1');
  const entry = whole.indexOf('avc1', stsd, 'latin1');
  if (stsd < 0 || entry < 0) throw new Error('Could not find the video sample entry to alter.');
  whole.write('zq9x', entry, 'latin1');
  await writeFile(p('unknown-codec.mp4'), whole);

  await ff(['-f', 'lavfi', '-i', 'color=c=teal:size=64x48', '-frames:v', '1', p('still.mp4.png')]);
  await copyFile(p('still.mp4.png'), p('still.mp4'));

  const frame = async (name: string, size: string, n: number): Promise<string> => {
    await ff(['-f', 'lavfi', '-i', `testsrc=size=${size}:rate=25`, '-vf', `select=eq(n\\,${n})`, '-frames:v', '1', p(name)]);
    return p(name);
  };
  const goodFrames = [await frame('f1.png', '160x120', 0), await frame('f2.png', '160x120', 1), await frame('f3.png', '160x120', 2)];
  const mixedSizeFrames = [goodFrames[0]!, goodFrames[1]!, await frame('f10.png', '200x150', 3)];
  const mixedTypeFrames = [goodFrames[0]!, goodFrames[1]!, await frame('f11.jpg', '160x120', 4)];

  return {
    textAsMp4: p('notes.mp4'),
    empty: p('empty.mp4'),
    truncatedMp4: p('cut.mp4'),
    truncatedNoIndex: p('cut-no-index.mp4'),
    audioOnly: p('sound-only.mp4'),
    unknownCodec: p('unknown-codec.mp4'),
    imageAsVideo: p('still.mp4'),
    mixedSizeFrames,
    goodFrames,
    mixedTypeFrames,
    backwardsTimestamps: p('backwards.mp4'),
    jumpyTimestamps: p('jumpy.mp4'),
  };
}
