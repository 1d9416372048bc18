import { defineStore } from 'pinia';
import { ref, shallowRef, watch } from 'vue';
import {
  cancelAtPeriodEnd,
  changeSeats,
  fetchBilling,
  openPortal,
  resumeSubscription,
  startCheckout,
  type CheckoutStartBody,
  type ClubBilling,
  type SubscriptionSummary,
} from '@/api/billing';
import { fetchClub } from '@/api/clubs';
import { loadErrorText } from '@/composables/use-loader';
import { useClubStore } from './club';

/**
 * The subscription of the club in view: the summary every member's banner reads, and for admins the whole
 * Seats & billing state with its commands. The provider's pages (checkout, portal) open in this tab.
 */
export const useBillingStore = defineStore('billing', () => {
  const club = useClubStore();
  const summary = shallowRef<SubscriptionSummary | null>(null);
  const billing = shallowRef<ClubBilling | null>(null);
  const loading = ref(false);
  const error = ref<string | null>(null);
  /** The command running, to show its button busy and keep the others still. */
  const busy = ref<'checkout' | 'seats' | 'cancel' | 'resume' | 'portal' | null>(null);

  function adopt(next: ClubBilling): void {
    billing.value = next;
    summary.value = { status: next.status, recordingAllowed: next.recordingAllowed, reason: next.reason, trialEndsAt: next.trialEndsAt };
  }

  async function loadSummary(): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    try {
      const profile = await fetchClub(clubId);
      if (club.clubId === clubId) summary.value = profile.subscription ?? null;
    } catch {
      // The banner is a hint: a failed read leaves it hidden, the page itself reports the failure.
    }
  }

  async function load(): Promise<void> {
    const clubId = club.clubId;
    if (clubId === null) return;
    loading.value = true;
    error.value = null;
    try {
      const next = await fetchBilling(clubId);
      if (club.clubId === clubId) adopt(next);
    } catch (cause) {
      error.value = loadErrorText(cause);
    } finally {
      loading.value = false;
    }
  }

  async function run<T>(what: NonNullable<typeof busy.value>, call: (clubId: number) => Promise<T>): Promise<T | null> {
    const clubId = club.clubId;
    if (clubId === null || busy.value) return null;
    busy.value = what;
    try {
      return await call(clubId);
    } finally {
      busy.value = null;
    }
  }

  /** Sends the browser to the provider's hosted checkout. */
  async function checkout(body: CheckoutStartBody): Promise<void> {
    const answer = await run('checkout', (id) => startCheckout(id, body));
    if (answer) window.location.assign(answer.url);
  }

  async function setSeats(seats: number): Promise<void> {
    const next = await run('seats', (id) => changeSeats(id, { seats }));
    if (next) adopt(next);
  }

  async function cancel(): Promise<void> {
    const next = await run('cancel', (id) => cancelAtPeriodEnd(id));
    if (next) adopt(next);
  }

  async function resume(): Promise<void> {
    const next = await run('resume', (id) => resumeSubscription(id));
    if (next) adopt(next);
  }

  /** Sends the browser to the provider's page for the card on file. */
  async function portal(): Promise<void> {
    const answer = await run('portal', (id) => openPortal(id));
    if (answer) window.location.assign(answer.url);
  }

  // Another club in view: forget the previous club's state before anything shows it.
  watch(
    () => club.clubId,
    () => {
      summary.value = null;
      billing.value = null;
      error.value = null;
    },
  );

  return { summary, billing, loading, error, busy, loadSummary, load, checkout, setSeats, cancel, resume, portal };
});
