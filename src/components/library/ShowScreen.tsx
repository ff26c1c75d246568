// A show's page: its header (edit, archive, import) and its shots table — filter by status, assignee and text, sort,
// pages, all server-side and kept in the URL; inline status/assignee edits (optimistic, rolled back on refusal);
// bulk status for the selected rows.
import { useMemo, useState } from 'react';
import { keepPreviousData, useMutation, useQuery, useQueryClient, type QueryKey } from '@tanstack/react-query';
import { createColumnHelper, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import { SHOT_STATUSES, type ShotStatus } from '~/lib/vocab';
import { api, ApiError, messageOf } from '../shared/api';
import { DismissableNotice, FormMessage, Spinner } from '../shared/form';
import { fullDate, relativeTime } from '../members/time';
import { LibraryQueries } from './query';
import { parseSearch, toQuery, useUrlState, type UrlState } from './url-state';
import { Pager, SearchBox, TableView, type ColumnMeta } from './TableView';
import { Dialog } from './fields';
import { StatusBadge, StatusIcon, STATUS_TONE } from './status';
import { AssigneeSelect, StatusSelect } from './inline';
import ShotForm from './ShotForm';
import ShowForm from './ShowForm';
import { ShotThumbnail } from './thumbnail';
import { dueLabel, isOverdue } from './format';
import { CutRange } from './CutRange';
import { rateText } from '~/lib/timecode';
import { can, keys, type Page, type Person, type ShotRow, type ShowDetail, type Viewer } from './types';

export const SHOT_DEFAULTS: UrlState = { q: '', status: '', assignee: '', archived: 'false', sort: 'code', order: 'asc', page: '1', pageSize: '25' };

interface Props {
  viewer: Viewer;
  show: ShowDetail;
  initialSearch: string;
  initialPage: Page<ShotRow> | null;
  people: Person[];
}

const apiParams = (showId: number, state: UrlState) => ({ ...state, showId: String(showId) });

export default function ShowScreen(props: Props) {
  const { studioId } = props.viewer;
  const first = apiParams(props.show.id, { ...SHOT_DEFAULTS, ...parseSearch(props.initialSearch) });
  return (
    <LibraryQueries
      seed={[
        [keys.shots(studioId, first), props.initialPage ?? undefined],
        [keys.show(studioId, props.show.id), props.show],
        [keys.people(studioId), can(props.viewer.role, 'artist') ? { people: props.people } : undefined],
      ]}
    >
      <Show {...props} />
    </LibraryQueries>
  );
}

const column = createColumnHelper<ShotRow>();
type Notice = { tone: 'error' | 'success'; text: string } | null;

function Show({ viewer, show: initialShow, initialSearch }: Props) {
  const { studioId, studioSlug, role } = viewer;
  const queryClient = useQueryClient();
  const [state, setState] = useUrlState(SHOT_DEFAULTS, initialSearch);
  const [notice, setNotice] = useState<Notice>(null);
  const [selected, setSelected] = useState<Set<number>>(new Set());
  const [bulkStatus, setBulkStatus] = useState<ShotStatus>('in review');
  const [dialog, setDialog] = useState<'shot' | 'show' | null>(null);
  const artist = can(role, 'artist');
  const supervisor = can(role, 'supervisor');

  const showQuery = useQuery({
    queryKey: keys.show(studioId, initialShow.id),
    queryFn: () => api<{ show: ShowDetail }>(`/api/studios/${studioId}/shows/${initialShow.id}`).then((a) => a.show),
  });
  const show = showQuery.data ?? initialShow;
  const params = apiParams(show.id, state);
  const shotsKey = keys.shots(studioId, params);
  const shots = useQuery({
    queryKey: shotsKey,
    queryFn: () => api<Page<ShotRow>>(`/api/studios/${studioId}/shots?${toQuery(params)}`),
    placeholderData: keepPreviousData,
  });
  const people = useQuery({
    queryKey: keys.people(studioId),
    queryFn: () => api<{ people: Person[] }>(`/api/studios/${studioId}/people`),
    enabled: artist,
    staleTime: 5 * 60_000,
  });
  const peopleList = people.data?.people ?? [];

  const refresh = () => {
    void queryClient.invalidateQueries({ queryKey: keys.allShots(studioId) });
    void queryClient.invalidateQueries({ queryKey: keys.show(studioId, show.id) });
  };

  // Inline edit: change the row in every cached page at once, put the old pages back if the server refuses.
  const workflow = useMutation({
    mutationFn: ({ shot, patch }: { shot: ShotRow; patch: { status?: ShotStatus; assigneeId?: string | null } }) =>
      api<{ shot: ShotRow }>(`/api/studios/${studioId}/shots/${shot.id}/workflow`, { method: 'PATCH', body: patch }),
    onMutate: async ({ shot, patch }) => {
      setNotice(null);
      await queryClient.cancelQueries({ queryKey: keys.allShots(studioId) });
      const previous = queryClient.getQueriesData<Page<ShotRow>>({ queryKey: keys.allShots(studioId) });
      const assigneeName = patch.assigneeId !== undefined ? (peopleList.find((p) => p.userId === patch.assigneeId)?.name ?? null) : undefined;
      queryClient.setQueriesData<Page<ShotRow>>({ queryKey: keys.allShots(studioId) }, (old) =>
        old
          ? {
              ...old,
              items: old.items.map((s) =>
                s.id === shot.id ? { ...s, ...patch, ...(assigneeName !== undefined ? { assigneeName } : {}) } : s,
              ),
            }
          : old,
      );
      return { previous };
    },
    onError: (err, { shot, patch }, context) => {
      for (const [key, data] of context?.previous ?? []) queryClient.setQueryData(key as QueryKey, data);
      const what = patch.status !== undefined ? 'status' : 'assignee';
      setNotice({ tone: 'error', text: `Could not change the ${what} of ${shot.code}: ${messageOf(err)}` });
    },
    onSettled: refresh,
  });

  const bulk = useMutation({
    mutationFn: (ids: number[]) => api<{ updated: number }>(`/api/studios/${studioId}/shots/bulk-status`, { method: 'POST', body: { ids, status: bulkStatus } }),
    onSuccess: (answer) => {
      setSelected(new Set());
      setNotice({ tone: 'success', text: `${answer.updated} shot${answer.updated === 1 ? '' : 's'} now ${bulkStatus}.` });
    },
    onError: (err) => setNotice({ tone: 'error', text: `Nothing changed: ${messageOf(err)}` }),
    onSettled: refresh,
  });

  const archiveShow = useMutation({
    mutationFn: () => api<{ show: ShowDetail }>(`/api/studios/${studioId}/shows/${show.id}/archive`, { method: 'POST', body: { archived: !show.archivedAt } }),
    onSuccess: (answer) => {
      queryClient.setQueryData(keys.show(studioId, show.id), answer.show);
      setNotice({ tone: 'success', text: answer.show.archivedAt ? `${show.code} is archived: its shots leave the active lists.` : `${show.code} is active again.` });
      refresh();
    },
    onError: (err) => setNotice({ tone: 'error', text: messageOf(err) }),
  });

  const toggle = (id: number) =>
    setSelected((old) => {
      const next = new Set(old);
      if (next.has(id)) next.delete(id);
      else next.add(id);
      return next;
    });

  const shotHref = (shot: ShotRow) => `/studios/${studioSlug}/shots/${shot.id}`;
  const items = shots.data?.items ?? [];
  const allOnPage = items.length > 0 && items.every((s) => selected.has(s.id));

  const columns = useMemo(
    () => [
      ...(supervisor
        ? [
            column.display({
              id: 'select',
              header: () => (
                <input
                  type="checkbox"
                  aria-label="Select all shots on this page"
                  className="size-4 accent-harbour-600"
                  checked={allOnPage}
                  onChange={() =>
                    setSelected((old) => {
                      const next = new Set(old);
                      for (const s of items) (allOnPage ? next.delete(s.id) : next.add(s.id));
                      return next;
                    })
                  }
                />
              ),
              meta: { className: 'w-10' } satisfies ColumnMeta,
              cell: (c) => (
                <input
                  type="checkbox"
                  tabIndex={-1}
                  aria-label={`Select ${c.row.original.code}`}
                  className="size-4 accent-harbour-600"
                  checked={selected.has(c.row.original.id)}
                  onChange={() => toggle(c.row.original.id)}
                />
              ),
            }),
          ]
        : []),
      column.accessor('thumbnailUrl', {
        id: 'thumbnail',
        header: () => <span className="sr-only">Thumbnail</span>,
        meta: { className: 'w-0 py-1.5 pr-0' } satisfies ColumnMeta,
        cell: (c) => <ShotThumbnail url={c.getValue()} code={c.row.original.code} />,
      }),
      column.accessor('code', {
        header: 'Shot',
        meta: { sortKey: 'code' } satisfies ColumnMeta,
        cell: (c) => (
          <div className="min-w-0">
            <a
              href={shotHref(c.row.original)}
              tabIndex={-1}
              title={c.getValue()}
              className="inline-block max-w-[16rem] truncate align-bottom font-semibold tracking-wide text-ink hover:text-harbour-700 hover:underline"
            >
              {c.getValue()}
            </a>
            {c.row.original.archivedAt && <span className="ml-2 rounded-full border border-sand-line px-2 py-0.5 text-xs text-ink-muted">archived</span>}
            {c.row.original.description && <p className="mt-0.5 line-clamp-1 max-w-xs text-xs break-all text-ink-muted" title={c.row.original.description}>
                {c.row.original.description}
              </p>}
          </div>
        ),
      }),
      column.accessor('status', {
        header: 'Status',
        meta: { sortKey: 'status', className: 'whitespace-nowrap' } satisfies ColumnMeta,
        cell: (c) =>
          artist ? (
            <StatusSelect
              value={c.getValue()}
              label={`Status of ${c.row.original.code}`}
              disabled={workflow.isPending && workflow.variables?.shot.id === c.row.original.id}
              onChange={(status) => workflow.mutate({ shot: c.row.original, patch: { status } })}
            />
          ) : (
            <StatusBadge status={c.getValue()} />
          ),
      }),
      column.accessor('assigneeId', {
        header: 'Assignee',
        cell: (c) =>
          artist ? (
            <AssigneeSelect
              value={c.getValue()}
              name={c.row.original.assigneeName}
              people={peopleList}
              label={`Assignee of ${c.row.original.code}`}
              disabled={workflow.isPending && workflow.variables?.shot.id === c.row.original.id}
              onChange={(assigneeId) => workflow.mutate({ shot: c.row.original, patch: { assigneeId } })}
            />
          ) : (
            <span className="text-ink-soft">{c.row.original.assigneeName ?? '—'}</span>
          ),
      }),
      column.accessor('firstFrame', {
        header: 'Cut in – cut out · handles',
        meta: { sortKey: 'firstFrame', className: 'whitespace-nowrap' } satisfies ColumnMeta,
        cell: (c) => <CutRange shot={c.row.original} testId={`cut-range-${c.row.original.code}`} />,
      }),
      column.accessor('dueDate', {
        header: 'Due',
        meta: { sortKey: 'dueDate', className: 'whitespace-nowrap' } satisfies ColumnMeta,
        cell: (c) => {
          const due = c.getValue();
          if (!due) return <span className="text-ink-muted">—</span>;
          const late = isOverdue(due) && c.row.original.status !== 'approved' && c.row.original.status !== 'omitted';
          return <span className={late ? 'font-medium text-coral-700' : 'text-ink-soft'}>{dueLabel(due)}{late && <span className="ml-1 text-xs">(late)</span>}</span>;
        },
      }),
      column.accessor('updatedAt', {
        header: 'Updated',
        meta: { sortKey: 'updated', className: 'whitespace-nowrap text-ink-soft' } satisfies ColumnMeta,
        cell: (c) => (
          <time dateTime={c.getValue()} title={fullDate(c.getValue())} suppressHydrationWarning>
            {relativeTime(c.getValue())}
          </time>
        ),
      }),
    ],
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [supervisor, artist, selected, allOnPage, items, peopleList, workflow.isPending, workflow.variables],
  );

  const table = useReactTable({ data: items, columns, getCoreRowModel: getCoreRowModel(), manualSorting: true, manualPagination: true, getRowId: (r) => String(r.id) });

  const failure = shots.error;
  if (failure instanceof ApiError && failure.status === 401) {
    window.location.assign(`/sign-in?next=${encodeURIComponent(window.location.pathname)}`);
    return null;
  }
  const statusFilter = state.status ? (state.status.split(',') as ShotStatus[]) : [];
  const toggleStatus = (s: ShotStatus) => {
    const next = statusFilter.includes(s) ? statusFilter.filter((x) => x !== s) : [...statusFilter, s];
    setState({ status: SHOT_STATUSES.filter((x) => next.includes(x)).join(','), page: '1' });
  };
  const onSort = (key: string) => setState({ sort: key, order: state.sort === key && state.order === 'asc' ? 'desc' : 'asc', page: '1' });
  const filtered = !!(state.q || state.status || state.assignee || state.archived !== 'false');

  return (
    <div className="space-y-5">
      <header className="flex flex-wrap items-start justify-between gap-4">
        <div className="min-w-0">
          <p className="text-sm text-ink-muted">
            <a href={`/studios/${studioSlug}/`} className="link">
              Library
            </a>{' '}
            <span aria-hidden="true">/</span> Show
          </p>
          <h1 className="mt-1 flex flex-wrap items-center gap-3 text-3xl font-semibold tracking-tight">
            <span className="rounded-md bg-ink px-2.5 py-0.5 text-base font-semibold tracking-wider text-sand">{show.code}</span>
            {/* A long name wraps, even one unbroken word, instead of pushing the page sideways. */}
            <span className="min-w-0 [overflow-wrap:anywhere]" title={show.name}>
              {show.name}
            </span>
            {show.archivedAt && <span className="rounded-full border border-sand-line px-2.5 py-0.5 text-sm font-normal text-ink-muted">archived</span>}
          </h1>
          <p className="mt-2 text-sm text-ink-soft">
            {rateText(show.frameRate)} · {show.shotCount} active shot{show.shotCount === 1 ? '' : 's'}
            {show.description && <span className="block max-w-2xl text-ink-muted [overflow-wrap:anywhere]">{show.description}</span>}
          </p>
        </div>
        {supervisor && (
          <div className="flex flex-wrap gap-2">
            <button type="button" className="btn-quiet" onClick={() => setDialog('show')}>
              Edit show
            </button>
            <button type="button" className="btn-quiet" disabled={archiveShow.isPending} onClick={() => archiveShow.mutate()}>
              {archiveShow.isPending && <Spinner />}
              {show.archivedAt ? 'Unarchive' : 'Archive'}
            </button>
            {!show.archivedAt && (
              <>
                <a className="btn-quiet" href={`/studios/${studioSlug}/shows/${show.id}/import`}>
                  Import EDL / CSV
                </a>
                <button type="button" className="btn-primary" onClick={() => setDialog('shot')}>
                  <span aria-hidden="true">+</span> New shot
                </button>
              </>
            )}
          </div>
        )}
      </header>

      <StatusSummary counts={show.statusCounts} />

      <div aria-live="polite">
        <DismissableNotice notice={notice} onDismiss={() => setNotice(null)} />
        {failure && <FormMessage>Could not load the shots: {messageOf(failure)}</FormMessage>}
      </div>

      <div className="flex flex-wrap items-center gap-3">
        <SearchBox label="Search code or description" value={state.q} onSearch={(q) => setState({ q, page: '1' })} />
        <div role="group" aria-label="Filter by status" className="flex flex-wrap gap-1.5">
          {SHOT_STATUSES.map((s) => (
            <button
              key={s}
              type="button"
              aria-pressed={statusFilter.includes(s)}
              onClick={() => toggleStatus(s)}
              className={`inline-flex items-center gap-1.5 rounded-full border px-2.5 py-1 text-xs font-medium aria-pressed:border-ink aria-pressed:bg-ink aria-pressed:text-sand ${
                statusFilter.includes(s) ? '' : `border-sand-line bg-paper ${STATUS_TONE[s]} hover:border-ink-muted`
              }`}
            >
              <StatusIcon status={s} className="size-3.5" />
              {s}
            </button>
          ))}
        </div>
        {artist && (
          <label className="flex items-center gap-2 text-sm text-ink-soft">
            <span>Assignee</span>
            <select className="field-input w-auto max-w-[14rem] py-1.5 pr-8" value={state.assignee} onChange={(e) => setState({ assignee: e.target.value, page: '1' })}>
              <option value="">Anyone</option>
              <option value="none">Unassigned</option>
              {peopleList.map((p) => (
                <option key={p.userId} value={p.userId}>
                  {p.name}
                </option>
              ))}
            </select>
          </label>
        )}
        <label className="flex items-center gap-2 text-sm text-ink-soft">
          <input type="checkbox" className="size-4 accent-harbour-600" checked={state.archived === 'all'} onChange={(e) => setState({ archived: e.target.checked ? 'all' : 'false', page: '1' })} />
          Include archived
        </label>
        {filtered && (
          <button type="button" className="btn px-2 py-1 text-harbour-700 hover:underline" onClick={() => setState({ q: '', status: '', assignee: '', archived: 'false', page: '1' })}>
            Clear filters
          </button>
        )}
      </div>

      {supervisor && selected.size > 0 && (
        <div role="region" aria-label="Selected shots" className="sticky top-16 z-10 flex flex-wrap items-center gap-3 rounded-lg bg-ink px-4 py-2.5 text-sm text-sand shadow-lg">
          <strong className="font-semibold">{selected.size} selected</strong>
          <label className="flex items-center gap-2">
            <span>Set status to</span>
            <select
              aria-label="Status for the selected shots"
              value={bulkStatus}
              onChange={(e) => setBulkStatus(e.target.value as ShotStatus)}
              className="rounded-md border border-ink-soft bg-ink px-2 py-1 text-sand"
            >
              {SHOT_STATUSES.map((s) => (
                <option key={s} value={s}>
                  {s}
                </option>
              ))}
            </select>
          </label>
          <button type="button" className="btn bg-harbour-500 px-3 py-1 text-white hover:bg-harbour-600" disabled={bulk.isPending} onClick={() => bulk.mutate([...selected])}>
            {bulk.isPending && <Spinner />}
            Apply
          </button>
          <button type="button" className="btn ml-auto px-3 py-1 text-sand/80 hover:text-sand" onClick={() => setSelected(new Set())}>
            Clear selection
          </button>
        </div>
      )}

      <TableView
        table={table}
        label={`Shots of ${show.code}`}
        testId="shots-table"
        sort={state.sort}
        order={state.order as 'asc' | 'desc'}
        onSort={onSort}
        onOpen={(shot) => window.location.assign(shotHref(shot))}
        onToggle={supervisor ? (shot) => toggle(shot.id) : undefined}
        isSelected={(shot) => selected.has(shot.id)}
        rowClassName={(s) => (s.archivedAt || s.status === 'omitted' ? 'text-ink-muted' : '')}
        fetching={shots.isFetching && !shots.isLoading}
        empty={
          shots.isLoading ? (
            'Loading shots…'
          ) : filtered ? (
            'No shot matches these filters.'
          ) : (
            <span>
              No shots in {show.code} yet.{' '}
              {supervisor && !show.archivedAt && (
                <>
                  <button type="button" className="link" onClick={() => setDialog('shot')}>
                    Add one
                  </button>{' '}
                  or{' '}
                  <a className="link" href={`/studios/${studioSlug}/shows/${show.id}/import`}>
                    import them from an edit
                  </a>
                  .
                </>
              )}
            </span>
          )
        }
      />
      {shots.data && (
        <Pager
          page={shots.data.page}
          pageSize={shots.data.pageSize}
          total={shots.data.total}
          noun={['shot', 'shots']}
          onPage={(p) => setState({ page: String(p) })}
          onPageSize={(n) => setState({ pageSize: String(n), page: '1' })}
        />
      )}
      <p className="text-xs text-ink-muted">
        Keys: <Kbd>↑</Kbd> <Kbd>↓</Kbd> move between shots, <Kbd>Enter</Kbd> opens one{supervisor && <>, <Kbd>Space</Kbd> selects it for a bulk status change</>}.
      </p>

      <Dialog open={dialog === 'shot'} title={`New shot in ${show.code}`} onClose={() => setDialog(null)} wide>
        <ShotForm
          studioId={studioId}
          showId={show.id}
          showRate={show.frameRate}
          convention={viewer.handleConvention}
          people={peopleList}
          onCancel={() => setDialog(null)}
          onSaved={(shot) => {
            setDialog(null);
            setNotice({ tone: 'success', text: `Created ${shot.code}.` });
            refresh();
          }}
        />
      </Dialog>
      <Dialog open={dialog === 'show'} title={`Edit ${show.code}`} onClose={() => setDialog(null)}>
        <ShowForm
          studioId={studioId}
          show={show}
          onCancel={() => setDialog(null)}
          onSaved={(saved) => {
            setDialog(null);
            queryClient.setQueryData(keys.show(studioId, show.id), saved);
            setNotice({ tone: 'success', text: `Saved ${saved.code}.` });
            refresh();
          }}
        />
      </Dialog>
    </div>
  );
}

function Kbd({ children }: { children: string }) {
  return <kbd className="rounded border border-sand-line bg-paper px-1 font-sans">{children}</kbd>;
}

/** Shot counts by status, each with its mark. */
function StatusSummary({ counts }: { counts: Partial<Record<ShotStatus, number>> }) {
  const total = SHOT_STATUSES.reduce((n, s) => n + (counts[s] ?? 0), 0);
  if (!total) return null;
  return (
    <ul aria-label="Shots by status" className="flex flex-wrap gap-x-5 gap-y-1 text-sm">
      {SHOT_STATUSES.filter((s) => counts[s]).map((s) => (
        <li key={s} className={`inline-flex items-center gap-1.5 ${STATUS_TONE[s]}`}>
          <StatusIcon status={s} />
          <span className="font-semibold tabular-nums">{counts[s]}</span> {s}
        </li>
      ))}
    </ul>
  );
}
