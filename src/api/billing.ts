import type { DataResponse } from '@shared/types/api';
import type { CheckoutStartBody, ClubBilling, InvoiceSummary, SeatChangeBody, SubscriptionSummary } from '@shared/schemas/billing';
import { http, type RequestOptions } from './http';

export type { CheckoutStartBody, ClubBilling, InvoiceSummary, SeatChangeBody, SubscriptionSummary };

const billing = (clubId: number) => `/clubs/${clubId}/billing`;

export async function fetchBilling(clubId: number, options?: RequestOptions): Promise<ClubBilling> {
  return (await http.get<DataResponse<ClubBilling>>(billing(clubId), options)).data;
}

/** Opens the provider's hosted checkout; returns the page to send the browser to. */
export async function startCheckout(clubId: number, body: CheckoutStartBody, options?: RequestOptions): Promise<{ url: string }> {
  return (await http.post<DataResponse<{ url: string }>>(`${billing(clubId)}/checkout`, body, options)).data;
}

export async function changeSeats(clubId: number, body: SeatChangeBody, options?: RequestOptions): Promise<ClubBilling> {
  return (await http.patch<DataResponse<ClubBilling>>(`${billing(clubId)}/seats`, body, options)).data;
}

export async function cancelAtPeriodEnd(clubId: number, options?: RequestOptions): Promise<ClubBilling> {
  return (await http.post<DataResponse<ClubBilling>>(`${billing(clubId)}/cancel`, undefined, options)).data;
}

export async function resumeSubscription(clubId: number, options?: RequestOptions): Promise<ClubBilling> {
  return (await http.post<DataResponse<ClubBilling>>(`${billing(clubId)}/resume`, undefined, options)).data;
}

/** Opens the provider's billing portal (change the card); returns its page. */
export async function openPortal(clubId: number, options?: RequestOptions): Promise<{ url: string }> {
  return (await http.post<DataResponse<{ url: string }>>(`${billing(clubId)}/portal`, undefined, options)).data;
}
