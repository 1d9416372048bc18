import { useRoute, useRouter } from 'vue-router';

/**
 * Shows the not-found page at the current address, as for any unknown URL: used when the API answers 404 for what
 * the page names (another athlete's record, another club's, or a deleted one), so nothing reveals it exists.
 */
export function useNotFoundPage(): () => void {
  const route = useRoute();
  const router = useRouter();
  return () => {
    void router.replace({ name: 'not-found', params: { pathMatch: route.path.slice(1).split('/') }, query: route.query, hash: route.hash });
  };
}
