import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type { Me } from '@shared/types/api';
import * as authApi from '@/api/auth';
import type { SignInBody, SignUpBody } from '@/api/auth';

/** The signed-in user and their memberships; `loaded` says whether /me has been asked yet. */
export const useAuthStore = defineStore('auth', () => {
  const me = ref<Me | null>(null);
  const loaded = ref(false);
  let pending: Promise<Me | null> | null = null;

  const isSignedIn = computed(() => me.value !== null);
  const user = computed(() => me.value?.user ?? null);

  /** Asks the server who is signed in; later calls reuse the answer unless `force` is set. */
  async function loadMe(force = false): Promise<Me | null> {
    if (loaded.value && !force) return me.value;
    if (!pending) {
      pending = authApi
        .fetchMe()
        .then((answer) => {
          me.value = answer;
          loaded.value = true;
          return answer;
        })
        .finally(() => {
          pending = null;
        });
    }
    return pending;
  }

  async function signIn(body: SignInBody): Promise<Me> {
    me.value = await authApi.signIn(body);
    loaded.value = true;
    return me.value;
  }

  async function signUp(body: SignUpBody): Promise<Me> {
    me.value = await authApi.signUp(body);
    loaded.value = true;
    return me.value;
  }

  async function signOut(): Promise<void> {
    try {
      await authApi.signOut();
    } finally {
      forget();
    }
  }

  /** Takes the signed-in user from an answer that signed them in (accepting an invitation). */
  function adopt(answer: Me): void {
    me.value = answer;
    loaded.value = true;
  }

  /** Drops the user locally (after sign-out, or when the server says the session ended). */
  function forget(): void {
    me.value = null;
    loaded.value = true;
  }

  /** Keeps the membership list in step after the club was renamed. */
  function renameClub(clubId: number, clubName: string): void {
    const membership = me.value?.memberships.find((m) => m.clubId === clubId);
    if (membership) membership.clubName = clubName;
  }

  return { me, loaded, isSignedIn, user, loadMe, signIn, signUp, signOut, adopt, forget, renameClub };
});
