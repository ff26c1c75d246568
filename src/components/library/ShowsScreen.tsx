// The library home: the studio's shows as a server-side sorted, searched and paged table, with new/edit/archive.
import { useMemo, useState } from 'react';
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { createColumnHelper, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import { api, ApiError, messageOf } from '../shared/api';
import { DismissableNotice, FormMessage } from '../shared/form';
import { relativeTime, fullDate } from '../members/time';
import { LibraryQueries } from './query';
import { parseSearch, toQuery, useUrlState, type UrlState } from './url-state';
import { Pager, SearchBox, TableView, type ColumnMeta } from './TableView';
import { Dialog } from './fields';
import ShowForm from './ShowForm';
import { rateText } from '~/lib/timecode';
import { can, keys, type Page, type ShowRow, type Viewer } from './types';

export const SHOW_DEFAULTS: UrlState = { q: '', archived: 'false', sort: 'code', order: 'asc', page: '1', pageSize: '25' };

interface Props {
  viewer: Viewer;
  studioName: string;
  initialSearch: string;
  initialPage: Page<ShowRow> | null;
}

export default function ShowsScreen(props: Props) {
  const first = { ...SHOW_DEFAULTS, ...parseSearch(props.initialSearch) };
  return (
    <LibraryQueries seed={[[keys.shows(props.viewer.studioId, first), props.initialPage ?? undefined]]}>
      <Shows {...props} />
    </LibraryQueries>
  );
}

const column = createColumnHelper<ShowRow>();

function Shows({ viewer, studioName, initialSearch }: Props) {
  const { studioId, studioSlug, role } = viewer;
  const queryClient = useQueryClient();
  const [state, setState] = useUrlState(SHOW_DEFAULTS, initialSearch);
  const [notice, setNotice] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const [creating, setCreating] = useState(false);
  const [editing, setEditing] = useState<ShowRow | null>(null);
  const supervisor = can(role, 'supervisor');

  const shows = useQuery({
    queryKey: keys.shows(studioId, state),
    queryFn: () => api<Page<ShowRow>>(`/api/studios/${studioId}/shows?${toQuery(state)}`),
    placeholderData: keepPreviousData,
  });

  const archive = useMutation({
    mutationFn: (show: ShowRow) => api(`/api/studios/${studioId}/shows/${show.id}/archive`, { method: 'POST', body: { archived: !show.archivedAt } }),
    onSuccess: (_a, show) => setNotice({ tone: 'success', text: show.archivedAt ? `${show.code} is back in the library.` : `${show.code} is archived. Find it under “Archived”.` }),
    onError: (err) => setNotice({ tone: 'error', text: messageOf(err) }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: ['library', studioId, 'shows'] }),
  });

  const open = (show: ShowRow) => window.location.assign(`/studios/${studioSlug}/shows/${show.id}`);

  const columns = useMemo(
    () => [
      column.accessor('code', {
        header: 'Code',
        meta: { sortKey: 'code', className: 'w-32' } satisfies ColumnMeta,
        cell: (c) => (
          <a
            href={`/studios/${studioSlug}/shows/${c.row.original.id}`}
            tabIndex={-1}
            title={c.getValue()}
            className="inline-block max-w-full truncate rounded-md bg-ink px-2 py-0.5 align-middle text-xs font-semibold tracking-wider text-sand hover:bg-harbour-700"
          >
            {c.getValue()}
          </a>
        ),
      }),
      column.accessor('name', {
        header: 'Show',
        meta: { sortKey: 'name' } satisfies ColumnMeta,
        cell: (c) => (
          <div className="min-w-0">
            {/* A long name (even one unbroken word) is cut with an ellipsis; the whole name is the tooltip. */}
            <a
              href={`/studios/${studioSlug}/shows/${c.row.original.id}`}
              tabIndex={-1}
              title={c.getValue()}
              className="inline-block max-w-[min(28rem,50vw)] truncate align-bottom font-medium text-ink hover:text-harbour-700 hover:underline"
            >
              {c.getValue()}
            </a>
            {c.row.original.archivedAt && <span className="ml-2 rounded-full border border-sand-line px-2 py-0.5 text-xs text-ink-muted">archived</span>}
            {c.row.original.description && <p className="mt-0.5 line-clamp-1 max-w-md text-xs break-all text-ink-muted" title={c.row.original.description}>
                {c.row.original.description}
              </p>}
          </div>
        ),
      }),
      column.accessor('frameRate', { header: 'Rate', meta: { className: 'whitespace-nowrap text-ink-soft tabular-nums' } satisfies ColumnMeta, cell: (c) => rateText(c.getValue()) }),
      column.accessor('shotCount', {
        header: 'Shots',
        meta: { sortKey: 'shots', className: 'tabular-nums', headClassName: '' } satisfies ColumnMeta,
        cell: (c) => <span className="font-medium">{c.getValue()}</span>,
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
      ...(supervisor
        ? [
            column.display({
              id: 'actions',
              header: () => <span className="sr-only">Actions</span>,
              meta: { className: 'text-right whitespace-nowrap' } satisfies ColumnMeta,
              cell: (c) => (
                <span className="inline-flex gap-1">
                  <button type="button" className="btn px-2.5 py-1 text-ink-soft hover:bg-sand-deep hover:text-ink" onClick={() => setEditing(c.row.original)} aria-label={`Edit ${c.row.original.code}`}>
                    Edit
                  </button>
                  <button
                    type="button"
                    className="btn px-2.5 py-1 text-ink-soft hover:bg-sand-deep hover:text-ink"
                    disabled={archive.isPending}
                    onClick={() => archive.mutate(c.row.original)}
                    aria-label={`${c.row.original.archivedAt ? 'Unarchive' : 'Archive'} ${c.row.original.code}`}
                  >
                    {c.row.original.archivedAt ? 'Unarchive' : 'Archive'}
                  </button>
                </span>
              ),
            }),
          ]
        : []),
    ],
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [studioSlug, supervisor, archive.isPending],
  );

  const data = shows.data;
  const table = useReactTable({ data: data?.items ?? [], columns, getCoreRowModel: getCoreRowModel(), manualSorting: true, manualPagination: true, getRowId: (r) => String(r.id) });

  const onSort = (key: string) => setState({ sort: key, order: state.sort === key && state.order === 'asc' ? 'desc' : 'asc', page: '1' });
  const failure = shows.error;
  if (failure instanceof ApiError && failure.status === 401) {
    window.location.assign(`/sign-in?next=${encodeURIComponent(window.location.pathname)}`);
    return null;
  }
  const noShowsAtAll = data && data.total === 0 && !state.q && state.archived === 'false';

  return (
    <div className="space-y-4">
      <div aria-live="polite">
        <DismissableNotice notice={notice} onDismiss={() => setNotice(null)} />
        {failure && <FormMessage>Could not load the shows: {messageOf(failure)}</FormMessage>}
      </div>

      <div className="flex flex-wrap items-center gap-3">
        <SearchBox label="Search code or name" value={state.q} onSearch={(q) => setState({ q, page: '1' })} />
        <div role="group" aria-label="Which shows" className="inline-flex rounded-lg border border-sand-line bg-paper p-0.5 text-sm">
          {[
            ['false', 'Active'],
            ['true', 'Archived'],
            ['all', 'All'],
          ].map(([value, label]) => (
            <button
              key={value}
              type="button"
              aria-pressed={state.archived === value}
              onClick={() => setState({ archived: value!, page: '1' })}
              className="rounded-md px-3 py-1 text-ink-soft aria-pressed:bg-ink aria-pressed:text-sand"
            >
              {label}
            </button>
          ))}
        </div>
        {supervisor && (
          <button type="button" className="btn-primary ml-auto" onClick={() => setCreating(true)}>
            <span aria-hidden="true">+</span> New show
          </button>
        )}
      </div>

      {noShowsAtAll ? (
        <section className="card px-6 py-10 sm:px-10" aria-labelledby="empty-heading">
          <h2 id="empty-heading" className="text-lg font-semibold">
            No shows yet
          </h2>
          <p className="mt-2 max-w-xl leading-relaxed text-ink-soft">
            {supervisor
              ? `Set up ${studioName}’s first show: give it a code and a frame rate, then add shots by hand or import them from the editor’s EDL.`
              : 'Shows appear here once a supervisor sets one up. Each show holds its shots, with their plates, frame ranges and versions.'}
          </p>
          {supervisor && (
            <button type="button" className="btn-primary mt-5" onClick={() => setCreating(true)}>
              Set up a show
            </button>
          )}
        </section>
      ) : (
        <>
          <TableView
            table={table}
            label="Shows"
            testId="shows-table"
            sort={state.sort}
            order={state.order as 'asc' | 'desc'}
            onSort={onSort}
            onOpen={open}
            fetching={shows.isFetching && !shows.isLoading}
            rowClassName={(s) => (s.archivedAt ? 'text-ink-muted' : '')}
            empty={shows.isLoading ? 'Loading shows…' : state.q ? `No show matches “${state.q}”.` : 'No shows here.'}
          />
          {data && (
            <Pager
              page={data.page}
              pageSize={data.pageSize}
              total={data.total}
              noun={['show', 'shows']}
              onPage={(p) => setState({ page: String(p) })}
              onPageSize={(n) => setState({ pageSize: String(n), page: '1' })}
            />
          )}
          <p className="text-xs text-ink-muted">
            Tip: click a row or press <kbd className="rounded border border-sand-line bg-paper px-1 font-sans">↑</kbd> <kbd className="rounded border border-sand-line bg-paper px-1 font-sans">↓</kbd> to move and{' '}
            <kbd className="rounded border border-sand-line bg-paper px-1 font-sans">Enter</kbd> to open a show.
          </p>
        </>
      )}

      <Dialog open={creating} title="New show" onClose={() => setCreating(false)}>
        <ShowForm
          studioId={studioId}
          onCancel={() => setCreating(false)}
          onSaved={(show) => window.location.assign(`/studios/${studioSlug}/shows/${show.id}`)}
        />
      </Dialog>
      <Dialog open={!!editing} title={`Edit ${editing?.code ?? 'show'}`} onClose={() => setEditing(null)}>
        {editing && (
          <ShowForm
            studioId={studioId}
            show={editing}
            onCancel={() => setEditing(null)}
            onSaved={(show) => {
              setEditing(null);
              setNotice({ tone: 'success', text: `Saved ${show.code}.` });
              void queryClient.invalidateQueries({ queryKey: ['library', studioId, 'shows'] });
            }}
          />
        )}
      </Dialog>
    </div>
  );
}
