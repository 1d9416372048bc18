import { SPORT_FOCUS_LABELS, type SportFocus } from '@shared/schemas/club';

/** Screen names of the Overview counts; any other key falls back to a readable form of itself. */
const COUNT_LABELS: Record<string, { label: string; icon: string }> = {
  members: { label: 'Members', icon: 'pi pi-id-card' },
  admins: { label: 'Club admins', icon: 'pi pi-key' },
  coaches: { label: 'Coaches', icon: 'pi pi-megaphone' },
  athletes: { label: 'Athlete members', icon: 'pi pi-user' },
  athleteProfiles: { label: 'Athlete profiles', icon: 'pi pi-users' },
  sessions: { label: 'Sessions', icon: 'pi pi-calendar' },
  clips: { label: 'Clips', icon: 'pi pi-video' },
  flights: { label: 'Flights', icon: 'pi pi-chart-line' },
  clipsProcessing: { label: 'Clips processing', icon: 'pi pi-hourglass' },
  flightsNeedingAttention: { label: 'Flights needing attention', icon: 'pi pi-flag' },
};

/** `athleteProfiles` → `Athlete profiles`. */
export function humanizeKey(key: string): string {
  const words = key.replace(/([a-z0-9])([A-Z])/g, '$1 $2').replace(/[_-]+/g, ' ').trim().toLowerCase();
  return words.charAt(0).toUpperCase() + words.slice(1);
}

export function countLabel(key: string): { label: string; icon: string } {
  return COUNT_LABELS[key] ?? { label: humanizeKey(key), icon: 'pi pi-hashtag' };
}

/** Known counts first, in a fixed order, then any others alphabetically. */
export function orderCountKeys(keys: string[]): string[] {
  const known = Object.keys(COUNT_LABELS);
  const rank = (k: string) => (known.includes(k) ? known.indexOf(k) : known.length);
  return [...keys].sort((a, b) => rank(a) - rank(b) || a.localeCompare(b));
}

export function sportFocusLabel(value: string | null | undefined): string {
  if (!value) return 'Not set';
  return SPORT_FOCUS_LABELS[value as SportFocus] ?? humanizeKey(value);
}

export const DOMINANT_SIDE_LABELS: Record<string, string> = { left: 'Left', right: 'Right', both: 'Both sides' };
