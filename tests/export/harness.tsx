// A page for browser tests and the export benchmark: mounts the Export and Share panels with props from the URL hash
// (the version page, owned elsewhere, mounts the same components). Served by Playwright routes on the app's origin.
import { createRoot } from 'react-dom/client';
import ExportPanel, { type ExportPanelProps } from '../../src/components/export/ExportPanel';
import SharePanel from '../../src/components/share/SharePanel';

const props = JSON.parse(decodeURIComponent(location.hash.slice(1))) as ExportPanelProps;
createRoot(document.getElementById('root')!).render(
  <div style={{ display: 'grid', gap: 24, maxWidth: 720, margin: '24px auto' }}>
    <ExportPanel {...props} />
    <SharePanel versionId={props.versionId} />
  </div>,
);
