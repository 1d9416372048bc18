import type { Role } from '@shared/types/api';

/** One entry of the left rail. Only screens that work are listed; `roles` says who sees the entry in the club in view. */
export interface NavItem {
  label: string;
  /** A PrimeIcons class, e.g. `pi pi-users`. */
  icon: string;
  /** The name of the route in `src/router/index.ts`. */
  routeName: string;
  roles: readonly Role[];
}

const EVERYONE: readonly Role[] = ['admin', 'coach', 'athlete'];
const STAFF: readonly Role[] = ['admin', 'coach'];
const ADMIN: readonly Role[] = ['admin'];
const ATHLETE: readonly Role[] = ['athlete'];

/** The rail, top to bottom. */
export const NAV_ITEMS: readonly NavItem[] = [
  { label: 'Overview', icon: 'pi pi-compass', routeName: 'overview', roles: STAFF },
  { label: 'My flights', icon: 'pi pi-send', routeName: 'my-flights', roles: ATHLETE },
  { label: 'Sessions', icon: 'pi pi-calendar', routeName: 'sessions', roles: EVERYONE },
  { label: 'Clips', icon: 'pi pi-video', routeName: 'clips', roles: EVERYONE },
  { label: 'Flights', icon: 'pi pi-chart-line', routeName: 'flights', roles: EVERYONE },
  { label: 'Progress', icon: 'pi pi-chart-bar', routeName: 'progress', roles: EVERYONE },
  { label: 'Planner', icon: 'pi pi-sliders-h', routeName: 'planner', roles: EVERYONE },
  { label: 'Squad', icon: 'pi pi-users', routeName: 'squad', roles: STAFF },
  { label: 'Club', icon: 'pi pi-building', routeName: 'club', roles: ADMIN },
  { label: 'Seats & billing', icon: 'pi pi-credit-card', routeName: 'billing', roles: ADMIN },
];

/** The entries a role sees, in rail order. */
export function navItemsFor(role: Role | null, items: readonly NavItem[] = NAV_ITEMS): NavItem[] {
  if (role === null) return [];
  return items.filter((item) => item.roles.includes(role));
}
