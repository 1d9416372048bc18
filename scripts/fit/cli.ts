/**
 * The `fit` command: fit traced flights from CSV files and print one JSON object per file per line.
 * Kept apart from `scripts/fit.ts` (which only wires the process) so tests can run it in-process.
 */
import { readFile } from 'node:fs/promises';
import { parseArgs } from 'node:util';
import {
  airFromConditions, airFromDensity, BALLS, BALL_IDS, CELSIUS_ZERO_K, ENGINE_VERSION, fitFlight, isPhysicsError, resolveBall,
  type Air, type BallProps, type Conditions, type FitResult, type ModelChoice, type ReleaseSpec, type RobustLoss,
} from '../../shared/physics/index';
import { parseFitTrackCsv, trackFileConditions, type TrackMeta } from '../../shared/tracks/csv';

export const USAGE = `Usage: npm run --silent fit -- [options] FILE...

Fits a flight model to each CSV file (header t,x,y: seconds, metres; first sample at the release;
'#' lines are comments) and prints one JSON object per file per line, in input order.
A file may describe itself in leading comments ('# mass_kg: 0.43', '# diameter_m: 0.22',
'# ball: football-5', '# air_density_kg_m3: 1.18', '# temperature_c: 18', '# pressure_pa: 100500',
'# humidity_pct: 60', '# altitude_m: 1600', '# wind_m_s: -2'); the options below serve the files that do not.

Ball:   --ball ID                  a catalogue ball (see --balls)
        --mass KG --diameter M     or its mass and diameter
Air:    --rho KG_M3                a known air density
        --temperature C --pressure PA --humidity PCT --altitude M
                                   or the weather (CIPM-2007; missing pressure from the altitude)
                                   default: standard sea-level air, with a warning
Model:  --model auto|vacuum|linear|drag|drag-lift   (default auto: drag, or drag-lift when the
                                   information criterion says lift is warranted)
        --wind M_S                 wind along the flight, + tailwind (default 0)
        --loss soft-l1|linear|cauchy|huber          robust loss (default soft-l1)
        --descending               accept flights that never rise (downward serves, spikes)
Release (when the trace starts after it):
        --release-time S           the release time in the file's clock (earlier samples left out)
        --release-height M         or the release height above the ground (0 for a ball on the ground or a tee, up to 5)
        --fps RATE                 the samples' frame rate, to count the frames traced back
Other:  --balls                    list the ball catalogue and exit
        --help                     this text

Output keys: file, model, launchSpeed (m/s), launchAngle (deg), launchHeight (m), cd, cdError, cl,
clError, apexHeight, apexTime, timeUp, timeDown, flightTime, carry, landingSpeed, landingAngle (deg
below horizontal), standardCarry (still ISO sea-level air), reynolds, rms, warnings, and more
(errors are one standard error). A file that cannot be fitted gives {"file", "error", "code"}.
Exit status: 0 when every file was fitted, 1 when any failed, 2 on wrong options.`;

export interface CliIo {
  out: (line: string) => void;
  err: (line: string) => void;
  readFile?: (path: string) => Promise<string>;
}

class UsageError extends Error {}

function num(name: string, value: string | undefined, lo: number, hi: number): number | undefined {
  if (value === undefined) return undefined;
  const v = Number(value);
  if (value.trim() === '' || !Number.isFinite(v)) throw new UsageError(`--${name} needs a number, got "${value}".`);
  if (v < lo || v > hi) throw new UsageError(`--${name} ${value} is outside ${lo}…${hi}.`);
  return v;
}

/** Round to `digits` significant digits; null stays null. Note: never to fixed decimals, which would zero small errors. */
function sig(v: number | null | undefined, digits: number): number | null {
  if (v === null || v === undefined || !Number.isFinite(v)) return null;
  if (v === 0) return 0;
  return Number(v.toPrecision(digits));
}

const V = 6; // significant digits of values: 0.1 mm on 100 m
const E = 3; // significant digits of standard errors

/** The JSON line of a fit, keys in the documented order. */
export function fitLine(file: string, fit: FitResult): Record<string, unknown> {
  return {
    file,
    model: fit.model,
    launchSpeed: sig(fit.launch.speed, V),
    launchSpeedError: sig(fit.launch.speedError, E),
    launchAngle: sig(fit.launch.angleDeg, V),
    launchAngleError: sig(fit.launch.angleDegError, E),
    launchHeight: sig(fit.launch.height, V),
    launchHeightError: sig(fit.launch.heightError, E),
    cd: sig(fit.cd, V),
    cdError: sig(fit.cdError, E),
    cl: sig(fit.cl, V),
    clError: sig(fit.clError, E),
    apexHeight: sig(fit.flight.apexHeight, V),
    apexTime: sig(fit.flight.apexTime, V),
    timeUp: sig(fit.flight.timeUp, V),
    timeDown: sig(fit.flight.timeDown, V),
    flightTime: sig(fit.flight.flightTime, V),
    carry: sig(fit.flight.carry, V),
    carryError: sig(fit.errors.carry, E),
    landingSpeed: sig(fit.flight.landingSpeed, V),
    landingAngle: sig(fit.flight.landingAngleDeg, V),
    standardCarry: sig(fit.standardCarry, V),
    reynolds: sig(fit.reynolds, 4),
    rms: sig(fit.rms, E),
    warnings: fit.warnings,
    dragRate: sig(fit.dragRate, V),
    dragRateError: sig(fit.dragRateError, E),
    horizontalSpeedLost: sig(fit.flight.horizontalSpeedLost, V),
    terminalSpeed: sig(fit.terminalSpeed, V),
    dragToWeight: sig(fit.dragToWeight, 4),
    regime: fit.regime,
    nearDragCrisis: fit.nearDragCrisis,
    vacuumCarry: sig(fit.vacuum.carry, V),
    vacuumApexHeight: sig(fit.vacuum.apexHeight, V),
    vacuumFlightTime: sig(fit.vacuum.flightTime, V),
    scaleFactor: sig(fit.scaleCheck?.factor, 5),
    scaleFactorError: sig(fit.scaleCheck?.error, E),
    cdPriorUsed: fit.cdPrior?.used ?? false,
    extrapolated: fit.extrapolated,
    trackEnd: sig(fit.trackEnd, V),
    releaseMode: fit.release.mode,
    releaseBackTime: sig(fit.release.backTime, V),
    releaseBackFrames: sig(fit.release.backFrames, 4),
    noiseCorrelation: sig(fit.noiseCorrelation.phi, 3),
    points: fit.points,
    outliers: fit.outliers,
    noise: sig(fit.noise, E),
    converged: fit.converged,
    iterations: fit.iterations,
    stopReason: fit.stopReason,
    airDensity: sig(fit.setup.air.densityKgM3, 5),
    windSpeed: fit.setup.windSpeed,
    engineVersion: ENGINE_VERSION,
  };
}

interface Defaults {
  ball?: BallProps;
  air?: Air;
  conditions?: Conditions;
  rho?: number;
  wind: number;
  model: ModelChoice;
  loss: RobustLoss;
  descending: boolean;
  release?: ReleaseSpec;
  fps?: number;
}

function parse(argv: string[]): { files: string[]; defaults: Defaults; help: boolean; balls: boolean } {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        ball: { type: 'string' }, mass: { type: 'string' }, diameter: { type: 'string' },
        rho: { type: 'string' }, temperature: { type: 'string' }, pressure: { type: 'string' },
        humidity: { type: 'string' }, altitude: { type: 'string' },
        model: { type: 'string' }, wind: { type: 'string' }, loss: { type: 'string' },
        descending: { type: 'boolean' }, balls: { type: 'boolean' }, help: { type: 'boolean', short: 'h' },
        'release-time': { type: 'string' }, 'release-height': { type: 'string' }, fps: { type: 'string' },
      },
    });
  } catch (e) {
    throw new UsageError((e as Error).message);
  }
  const v = parsed.values;
  if (v.help || v.balls) return { files: parsed.positionals, defaults: { wind: 0, model: 'auto', loss: 'soft-l1', descending: false }, help: !!v.help, balls: !!v.balls };
  if (parsed.positionals.length === 0) throw new UsageError('Give at least one CSV file.');
  const model = (v.model ?? 'auto') as ModelChoice;
  if (!['auto', 'vacuum', 'linear', 'drag', 'drag-lift'].includes(model)) throw new UsageError(`--model must be auto, vacuum, linear, drag or drag-lift, got "${v.model}".`);
  const loss = (v.loss ?? 'soft-l1') as RobustLoss;
  if (!['soft-l1', 'linear', 'cauchy', 'huber'].includes(loss)) throw new UsageError(`--loss must be soft-l1, linear, cauchy or huber, got "${v.loss}".`);
  if (v.ball !== undefined && (v.mass !== undefined || v.diameter !== undefined)) throw new UsageError('Give either --ball or --mass with --diameter, not both.');
  if ((v.mass === undefined) !== (v.diameter === undefined)) throw new UsageError('--mass and --diameter go together.');
  if (v.ball !== undefined && !BALLS[v.ball]) throw new UsageError(`Unknown ball "${v.ball}". Known: ${BALL_IDS.join(', ')}.`);
  const weather = [v.temperature, v.pressure, v.humidity, v.altitude].some((x) => x !== undefined);
  if (v.rho !== undefined && weather) throw new UsageError('Give either --rho or the weather (--temperature, --pressure, --humidity, --altitude), not both.');
  const defaults: Defaults = {
    wind: num('wind', v.wind, -60, 60) ?? 0,
    model, loss, descending: !!v.descending,
  };
  if (v['release-time'] !== undefined && v['release-height'] !== undefined) throw new UsageError('Give either --release-time or --release-height, not both.');
  const releaseTime = num('release-time', v['release-time'], -1e6, 1e6), releaseHeight = num('release-height', v['release-height'], 0, 5);
  if (releaseTime !== undefined) defaults.release = { time: releaseTime };
  if (releaseHeight !== undefined) defaults.release = { height: releaseHeight };
  defaults.fps = num('fps', v.fps, 1, 100000);
  if (v.ball !== undefined) defaults.ball = resolveBall(v.ball);
  const mass = num('mass', v.mass, 1e-4, 20), diameter = num('diameter', v.diameter, 1e-3, 1);
  if (mass !== undefined && diameter !== undefined) defaults.ball = { massKg: mass, diameterM: diameter, name: 'the ball' };
  const rho = num('rho', v.rho, 0.3, 1.6);
  if (rho !== undefined) defaults.air = airFromDensity(rho);
  if (weather) {
    // The option takes °C, as analysts write it; the engine reads kelvin.
    const temperatureC = num('temperature', v.temperature, -40, 60);
    defaults.conditions = {
      airTemperatureK: temperatureC === undefined ? undefined : temperatureC + CELSIUS_ZERO_K,
      airPressurePa: num('pressure', v.pressure, 30000, 110000),
      relativeHumidityPct: num('humidity', v.humidity, 0, 100),
      altitudeM: num('altitude', v.altitude, -500, 10000),
    };
    defaults.air = airFromConditions(defaults.conditions);
  }
  return { files: parsed.positionals, defaults, help: false, balls: false };
}

/**
 * The value of `make` for a key, made once per run: files of one session share their ball and air,
 * and the CIPM-2007 density need not be computed again for each.
 */
function memo<T>(cache: Map<string, T>, key: string, make: () => T): T {
  let v = cache.get(key);
  if (v === undefined && !cache.has(key)) { v = make(); cache.set(key, v); }
  return v as T;
}

function ballFor(meta: TrackMeta, d: Defaults): BallProps | undefined {
  if (meta.ball !== undefined) return resolveBall(meta.ball);
  if (meta.massKg !== undefined || meta.diameterM !== undefined) {
    const massKg = meta.massKg ?? d.ball?.massKg;
    const diameterM = meta.diameterM ?? d.ball?.diameterM;
    if (massKg === undefined || diameterM === undefined) return undefined;
    return resolveBall({ massKg, diameterM, name: 'the ball' });
  }
  return d.ball;
}

function airFor(meta: TrackMeta, d: Defaults): Air | undefined {
  const conditions = trackFileConditions(meta);
  if (meta.airDensityKgM3 !== undefined) return airFromDensity(meta.airDensityKgM3, conditions?.airTemperatureK ?? undefined);
  if (conditions) return airFromConditions(conditions);
  return d.air;
}

/**
 * Run the command.
 * @returns the exit status: 0 all fitted, 1 some file failed, 2 wrong options.
 */
export async function runFitCli(argv: string[], io: CliIo): Promise<number> {
  let opts;
  try {
    opts = parse(argv);
  } catch (e) {
    if (e instanceof UsageError || isPhysicsError(e)) {
      io.err(`fit: ${(e as Error).message}`);
      io.err(USAGE);
      return 2;
    }
    throw e;
  }
  if (opts.help) { io.out(USAGE); return 0; }
  if (opts.balls) {
    for (const id of BALL_IDS) {
      const b = BALLS[id];
      io.out(JSON.stringify({ id, name: b.name, massKg: b.massKg, diameterM: b.diameterM, cd: { min: b.cd.min, max: b.cd.max, nominal: b.cd.nominal }, rule: b.rule.source, cdSource: b.cd.source }));
    }
    return 0;
  }
  // Note: reads stay asynchronous. A synchronous read saved 6 % CPU but, on a machine shared with other
  // work, took 1.46× the wall time (measured paired, 120 files): the process gave up the processor less often.
  const read = io.readFile ?? ((p: string) => readFile(p, 'utf8'));
  const balls = new Map<string, BallProps | undefined>(), airs = new Map<string, Air | undefined>();
  let failed = 0;
  for (const file of opts.files) {
    try {
      let text: string;
      try {
        text = await read(file);
      } catch (e) {
        throw new Error(`cannot read the file (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
      }
      const { track, meta } = parseFitTrackCsv(text);
      const ball = memo(balls, JSON.stringify([meta.ball, meta.massKg, meta.diameterM]), () => ballFor(meta, opts.defaults));
      const air = memo(airs, JSON.stringify([meta.airDensityKgM3, meta.temperatureC, meta.pressurePa, meta.humidityPct, meta.altitudeM]), () => airFor(meta, opts.defaults));
      const fit = fitFlight(track, {
        model: opts.defaults.model, ball, air, windSpeed: meta.windAlongFlightMps ?? opts.defaults.wind,
        loss: opts.defaults.loss, allowDescending: opts.defaults.descending,
        ...(opts.defaults.release ? { release: opts.defaults.release } : {}),
        ...(opts.defaults.fps ? { frameRate: opts.defaults.fps } : {}),
      });
      io.out(JSON.stringify(fitLine(file, fit)));
    } catch (e) {
      failed++;
      const code = isPhysicsError(e) ? e.code : 'READ_FAILED';
      if (!isPhysicsError(e) && !(e instanceof Error && e.message.startsWith('cannot read'))) {
        io.out(JSON.stringify({ file, error: `unexpected failure: ${(e as Error).message}`, code: 'INTERNAL' }));
        continue;
      }
      io.out(JSON.stringify({ file, error: (e as Error).message, code }));
    }
  }
  return failed > 0 ? 1 : 0;
}
