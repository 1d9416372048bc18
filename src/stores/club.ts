import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type { MembershipSummary, Role } from '@shared/types/api';
import { useAuthStore } from './auth';

/** localStorage key of the club in view, so a reload stays in the same club. */
export const CLUB_STORAGE_KEY = 'arcwright.currentClubId';

function readStoredClubId(): number | null {
  try {
    const raw = window.localStorage.getItem(CLUB_STORAGE_KEY);
    const id = raw === null ? NaN : Number(raw);
    return Number.isInteger(id) && id > 0 ? id : null;
  } catch {
    // Note: storage can be blocked (private mode, strict settings); the first membership is then used.
    return null;
  }
}

function storeClubId(id: number | null): void {
  try {
    if (id === null) window.localStorage.removeItem(CLUB_STORAGE_KEY);
    else window.localStorage.setItem(CLUB_STORAGE_KEY, String(id));
  } catch {
    // Storage blocked: the choice lasts for this page only.
  }
}

/**
 * The club in view and the signed-in user's role in it. Every API call of a view is scoped to `clubId`.
 * Falls back to the first membership when the remembered club is not (or no longer) one of the user's.
 */
export const useClubStore = defineStore('club', () => {
  const auth = useAuthStore();
  const chosenClubId = ref<number | null>(readStoredClubId());

  const memberships = computed<MembershipSummary[]>(() => auth.me?.memberships ?? []);
  const current = computed<MembershipSummary | null>(
    () => memberships.value.find((m) => m.clubId === chosenClubId.value) ?? memberships.value[0] ?? null,
  );
  const clubId = computed<number | null>(() => current.value?.clubId ?? null);
  const clubName = computed<string>(() => current.value?.clubName ?? '');
  const role = computed<Role | null>(() => current.value?.role ?? null);
  const athleteProfileId = computed<number | null>(() => current.value?.athleteProfileId ?? null);

  /** True when the user's role in the club in view is one of `roles`. */
  function hasRole(roles: readonly Role[]): boolean {
    return role.value !== null && roles.includes(role.value);
  }

  function switchClub(id: number): void {
    if (!memberships.value.some((m) => m.clubId === id)) return;
    chosenClubId.value = id;
    storeClubId(id);
  }

  return { memberships, current, clubId, clubName, role, athleteProfileId, hasRole, switchClub };
});
