import { shallowRef } from 'vue';
import type { FlightAction } from '@shared/schemas/flight';
import { listFlightActions } from '@/api/flights';

/** The club's action labels by key, loaded once per component; a key not (yet) known reads humanised. */
export function useActionLabels(clubId: number) {
  const actions = shallowRef<FlightAction[]>([]);
  void listFlightActions(clubId)
    .then((list) => {
      actions.value = list;
    })
    .catch(() => undefined);
  function actionLabel(key: string): string {
    return actions.value.find((a) => a.key === key)?.label ?? key.replace(/_/g, ' ');
  }
  return { actions, actionLabel };
}
