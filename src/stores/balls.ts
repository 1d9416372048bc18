import { defineStore } from 'pinia';
import { ref } from 'vue';
import { createClubBall, deleteClubBall, listClubBalls, updateClubBall, type ClubBall, type ClubBallInput, type ClubBallPatch } from '@/api/balls';
import { setClubBalls } from '@/components/trace/balls';

/**
 * The club's own balls for the club in view: loaded once per club, kept in step after each edit, and
 * handed to the ball helpers so that every picker and every name on screen knows them.
 */
export const useBallsStore = defineStore('balls', () => {
  const clubId = ref<number | null>(null);
  const balls = ref<ClubBall[]>([]);
  const error = ref<string | null>(null);
  let loading: Promise<void> | null = null;

  function replace(list: ClubBall[]): void {
    balls.value = [...list].sort((a, b) => a.name.localeCompare(b.name));
    setClubBalls(balls.value);
  }

  /** Loads the club's balls unless they are loaded already (`force` reloads). */
  async function load(id: number, force = false): Promise<void> {
    if (!force && clubId.value === id && loading) return loading;
    if (clubId.value !== id) replace([]);
    clubId.value = id;
    loading = (async () => {
      try {
        const list = await listClubBalls(id);
        if (clubId.value === id) replace(list);
        error.value = null;
      } catch {
        error.value = 'The club’s own balls could not be loaded; only the catalogue is listed.';
        loading = null;
      }
    })();
    return loading;
  }

  async function add(id: number, body: ClubBallInput): Promise<ClubBall> {
    const created = await createClubBall(id, body);
    replace([...balls.value, created]);
    return created;
  }

  async function edit(id: number, ballRowId: number, body: ClubBallPatch): Promise<ClubBall & { refitJobIds: number[] }> {
    const saved = await updateClubBall(id, ballRowId, body);
    replace(balls.value.map((b) => (b.id === saved.id ? saved : b)));
    return saved;
  }

  async function remove(id: number, ballRowId: number): Promise<void> {
    await deleteClubBall(id, ballRowId);
    replace(balls.value.filter((b) => b.id !== ballRowId));
  }

  return { clubId, balls, error, load, add, edit, remove };
});
