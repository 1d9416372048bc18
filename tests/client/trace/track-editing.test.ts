import { describe, expect, it } from 'vitest';
import { placePoint } from '../../../src/components/trace/track-edit';
import { useTrackEditing } from '../../../src/components/trace/use-track-editing';

describe('useTrackEditing', () => {
  it('marks the track unsaved after an edit and takes it back with undo', () => {
    const track = useTrackEditing();
    track.edit('mark frame 3', (list) => placePoint(list, 3, 10, 20));
    expect(track.points.value).toHaveLength(1);
    expect(track.dirty.value).toBe(true);
    expect(track.canUndo.value).toBe(true);
    track.undo();
    expect(track.points.value).toHaveLength(0);
    expect(track.dirty.value).toBe(false);
    expect(track.canRedo.value).toBe(true);
  });

  it('takes the server points as saved and keeps the screen points for undo when it adopts them', () => {
    const track = useTrackEditing();
    track.edit('mark frame 3', (list) => placePoint(list, 3, 10, 20));
    const followed = placePoint(placePoint([], 3, 10, 20), 4, 12, 18);
    track.adopt(followed, 'auto-follow');
    expect(track.points.value).toBe(followed);
    expect(track.dirty.value).toBe(false);
    track.undo();
    expect(track.points.value).toHaveLength(1);
    expect(track.dirty.value).toBe(true);
  });

  it('keeps the undo history when a save is marked', () => {
    const track = useTrackEditing();
    track.edit('mark frame 3', (list) => placePoint(list, 3, 10, 20));
    track.markSaved(track.points.value);
    expect(track.dirty.value).toBe(false);
    expect(track.canUndo.value).toBe(true);
  });

  it('records nothing when an edit changes nothing', () => {
    const track = useTrackEditing();
    track.edit('no change', (list) => list);
    expect(track.canUndo.value).toBe(false);
  });

  it('forgets the history and the unsaved state when another track is loaded', () => {
    const track = useTrackEditing();
    track.edit('mark frame 3', (list) => placePoint(list, 3, 10, 20));
    track.resetTrack([]);
    expect(track.canUndo.value).toBe(false);
    expect(track.dirty.value).toBe(false);
  });
});
