/**
 * Configuration a production process must refuse to start with: the local stand-ins of hosted
 * services are for one developer's machine, never for a server people rely on.
 */
import type { Config } from './config';

function isLoopbackUrl(url: string): boolean {
  try {
    const host = new URL(url).hostname;
    return host === '127.0.0.1' || host === 'localhost' || host === '[::1]' || host === '::1';
  } catch {
    return false;
  }
}

/** The problems that stop a production start, as sentences that say what to change; empty when fine. */
export function unsafeProductionSettings(config: Config): string[] {
  if (!config.isProduction) return [];
  const problems: string[] = [];
  if (config.fakes.enabled) {
    problems.push('FAKES is on: the local stand-ins (OAuth, payment, mail sink) never run in production. Set FAKES=0.');
  }
  if (config.google.enabled) {
    const urls = { GOOGLE_AUTH_URL: config.google.authUrl, GOOGLE_TOKEN_URL: config.google.tokenUrl, GOOGLE_USERINFO_URL: config.google.userinfoUrl };
    const local = Object.entries(urls).filter(([, url]) => isLoopbackUrl(url)).map(([name]) => name);
    if (local.length > 0) {
      problems.push(
        `${local.join(', ')} point at the local OAuth stand-in: set the real provider's URLs (see .env.example) or turn Google sign-in off with GOOGLE_SIGNIN=0.`,
      );
    }
  }
  return problems;
}

/** Throws with every problem when NODE_ENV=production is combined with a stand-in's settings. */
export function assertSafeConfiguration(config: Config): void {
  const problems = unsafeProductionSettings(config);
  if (problems.length > 0) throw new Error(`Refusing to start with NODE_ENV=production:\n- ${problems.join('\n- ')}`);
}
