import { defineStore } from 'pinia';
import { computed, ref, watch } from 'vue';
import { updateAccount } from '@/api/account';
import { fetchClub } from '@/api/clubs';
import { effectiveUnits, type UnitSystem, type UnitsPreference } from '@/utils/units';
import { useAuthStore } from './auth';
import { useClubStore } from './club';

/**
 * The display units every screen shows: the signed-in member's own choice (`unitsPreference`), or the setting of
 * the club in view when they follow the club. Metric until the club's setting is known or when it cannot be read.
 */
export const useUnitsStore = defineStore('units', () => {
  const auth = useAuthStore();
  const club = useClubStore();
  /** The club's own setting, once read. */
  const clubUnits = ref<UnitSystem | null>(null);
  let clubUnitsOf: number | null = null;
  let pending: Promise<void> | null = null;

  const preference = computed<UnitsPreference>(() => auth.user?.unitsPreference ?? 'club');
  const system = computed<UnitSystem>(() => effectiveUnits(preference.value, clubUnits.value));

  /** Reads the club's setting once per club; resolves with the units to show. */
  async function ensure(): Promise<UnitSystem> {
    const clubId = club.clubId;
    if (clubId !== null && clubUnitsOf !== clubId) {
      pending ??= fetchClub(clubId)
        .then((profile) => {
          if (club.clubId !== clubId) return;
          clubUnits.value = profile.units === 'imperial' ? 'imperial' : 'metric';
          clubUnitsOf = clubId;
        })
        .catch(() => {
          // Units are a display preference: a failed read keeps what is known rather than blocking the screen.
        })
        .finally(() => {
          pending = null;
        });
      await pending;
    }
    return system.value;
  }

  /** The club's setting after an admin changed it on the Club screen. */
  function clubChanged(clubId: number, units: UnitSystem): void {
    if (club.clubId !== clubId) return;
    clubUnits.value = units;
    clubUnitsOf = clubId;
  }

  /** Stores the member's own choice on the server and shows it at once. */
  async function choose(next: UnitsPreference): Promise<void> {
    auth.adopt(await updateAccount({ unitsPreference: next }));
  }

  watch(
    () => club.clubId,
    () => {
      clubUnits.value = null;
      clubUnitsOf = null;
    },
  );

  return { preference, system, clubUnits, ensure, clubChanged, choose };
});
