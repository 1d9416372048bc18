import type { Role } from '@shared/types/api';

/** How a role is named on screen. */
export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Club admin',
  coach: 'Coach',
  athlete: 'Athlete',
};

/** "a club admin", "a coach", "an athlete": for sentences. */
export function roleWithArticle(role: Role): string {
  const label = ROLE_LABELS[role].toLowerCase();
  return /^[aeiou]/.test(label) ? `an ${label}` : `a ${label}`;
}

export function roleLabel(role: Role | null | undefined): string {
  return role ? ROLE_LABELS[role] : '';
}

/** Two letters for an avatar: first letters of the first two words. */
export function initials(name: string): string {
  const words = name.trim().split(/\s+/).filter(Boolean);
  const letters = words.slice(0, 2).map((w) => w[0]?.toUpperCase() ?? '');
  return letters.join('') || '?';
}
