// Table state kept in the page's URL query (so a filtered, sorted page can be shared, bookmarked and reloaded).
import { useCallback, useEffect, useState } from 'react';

export type UrlState = Record<string, string>;

/** Parses a query string into a plain record. */
export function parseSearch(search: string): UrlState {
  return Object.fromEntries(new URLSearchParams(search));
}

/**
 * Returns the state (defaults overlaid by the URL's values) and a setter that writes changed values back to the URL
 * (values equal to their default are left out). `initialSearch` is the server's view of the query, for the first render.
 */
export function useUrlState(defaults: UrlState, initialSearch: string): [UrlState, (patch: UrlState) => void] {
  const [raw, setRaw] = useState<UrlState>(() => parseSearch(initialSearch));
  useEffect(() => {
    const onPop = () => setRaw(parseSearch(window.location.search));
    window.addEventListener('popstate', onPop);
    return () => window.removeEventListener('popstate', onPop);
  }, []);
  const state = { ...defaults, ...raw };
  const update = useCallback(
    (patch: UrlState) => {
      setRaw((old) => {
        const next = { ...old, ...patch };
        const params = new URLSearchParams();
        for (const [k, v] of Object.entries(next)) if (v !== '' && v !== defaults[k]) params.set(k, v);
        const clean = Object.fromEntries(params);
        const search = params.toString();
        window.history.replaceState(window.history.state, '', `${window.location.pathname}${search ? `?${search}` : ''}`);
        return clean;
      });
    },
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [JSON.stringify(defaults)],
  );
  return [state, update];
}

/** The API query string for a state record (empty values left out). */
export function toQuery(state: UrlState): string {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(state)) if (v !== '') params.set(k, v);
  return params.toString();
}
