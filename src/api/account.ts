import type { AccountUpdateBody } from '@shared/schemas/account';
import type { DataResponse, Me } from '@shared/types/api';
import { http, type RequestOptions } from './http';

export type { AccountUpdateBody };

/** Changes the signed-in user's own settings; answers with the signed-in user as `/auth/me` does. */
export async function updateAccount(changes: AccountUpdateBody, options?: RequestOptions): Promise<Me> {
  return (await http.patch<DataResponse<Me>>('/account', changes, options)).data;
}

