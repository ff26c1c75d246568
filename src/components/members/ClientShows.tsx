// A client member's shows: which of the studio's shows this client may see. Owners tick the shows and save.
import { useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, messageOf } from '../shared/api';
import { Spinner } from '../shared/form';
import { keys, type Member, type Notice } from './types';

interface ShowItem {
  id: number;
  code: string;
  name: string;
}

interface Props {
  studioId: number;
  member: Member;
  canEdit: boolean;
  onNotice: (notice: Notice) => void;
}

export default function ClientShows({ studioId, member, canEdit, onNotice }: Props) {
  const queryClient = useQueryClient();
  const [editing, setEditing] = useState(false);
  const [picked, setPicked] = useState<number[]>(member.showIds ?? []);
  const shows = useQuery({
    queryKey: ['studio-shows', studioId],
    queryFn: () => api<{ items: ShowItem[] }>(`/api/studios/${studioId}/shows?pageSize=100&archived=false&sort=code`),
  });
  const save = useMutation({
    mutationFn: (showIds: number[]) => api(`/api/studios/${studioId}/members/${member.id}`, { method: 'PATCH', body: { showIds } }),
    onMutate: () => onNotice(null),
    onError: (err) => onNotice({ tone: 'error', text: messageOf(err) }),
    onSuccess: () => {
      setEditing(false);
      onNotice({ tone: 'success', text: `${member.name} now sees ${picked.length === 1 ? 'one show' : `${picked.length} shows`}.` });
    },
    onSettled: () => queryClient.invalidateQueries({ queryKey: keys.members(studioId) }),
  });
  const byId = new Map((shows.data?.items ?? []).map((s) => [s.id, s]));
  const names = (member.showIds ?? []).map((id) => byId.get(id)?.code ?? `#${id}`);

  if (!editing) {
    return (
      <div className="mt-1 text-xs text-ink-soft" data-testid={`client-shows-${member.id}`}>
        <span>Sees {names.length ? names.join(', ') : 'no shows yet'}</span>
        {canEdit && (
          <button type="button" className="ml-2 text-harbour-700 underline" onClick={() => setEditing(true)}>
            Choose shows
          </button>
        )}
      </div>
    );
  }
  return (
    <fieldset className="mt-2 rounded border border-sand-line p-2 text-xs" aria-label={`Shows ${member.name} may see`}>
      <legend className="px-1 text-ink-soft">Shows {member.name.split(' ')[0]} may see</legend>
      {shows.isPending && <Spinner />}
      {(shows.data?.items ?? []).map((s) => (
        <label key={s.id} className="flex items-center gap-2 py-0.5">
          <input
            type="checkbox"
            checked={picked.includes(s.id)}
            onChange={(e) => setPicked((p) => (e.target.checked ? [...p, s.id] : p.filter((x) => x !== s.id)))}
          />
          <span className="font-medium">{s.code}</span> <span className="text-ink-muted">{s.name}</span>
        </label>
      ))}
      <div className="mt-2 flex gap-2">
        <button type="button" className="btn-primary px-3 py-1" disabled={save.isPending} onClick={() => save.mutate(picked)}>
          {save.isPending && <Spinner />}
          Save shows
        </button>
        <button type="button" className="btn-quiet px-3 py-1" onClick={() => (setEditing(false), setPicked(member.showIds ?? []))}>
          Cancel
        </button>
      </div>
    </fieldset>
  );
}
