// Panel entry point: lays out the sections, routes host messages to them and keeps a compact copy
// of what it shows in the webview state so a reload (or a restored window) comes back as it was.
import '@vscode-elements/elements/dist/vscode-single-select/index.js';
import '@vscode-elements/elements/dist/vscode-option/index.js';
import '@vscode-elements/elements/dist/vscode-textfield/index.js';
import '@vscode-elements/elements/dist/vscode-checkbox/index.js';
import '@vscode-elements/elements/dist/vscode-button/index.js';
import {
  isHostToPanel,
  LIMITS,
  PROTOCOL_VERSION,
  type FitSummary,
  type HostToPanel,
  type PanelState,
  type RegionMap,
  type SuspectRow,
} from '../src/protocol/messages';
import { append, clear, custom, h, section } from './dom';
import { loadState, post, saveState } from './host';
import { MapMatrixView } from './map/matrix';
import { RegionMapView } from './map/view';
import { ContributionsView } from './sections/contributions';
import { CurveView } from './sections/curve';
import { CrossValidationPanel } from './sections/cross-validation';
import { DependenceView } from './sections/dependence';
import { DiagnosticsView } from './sections/diagnostics';
import { RankingView } from './sections/evaluation';
import { ImportanceView } from './sections/importance';
import { SweepView } from './sections/sweep';
import { SummaryView } from './sections/summary';
import { RowsTableView } from './sections/rows-table';
import { SuspectsView } from './sections/suspects';
import { VotesView } from './sections/votes';
import { onThemeChange, readTheme, type Theme } from './theme';

export const CAUTION =
  'A quick forest is an exploratory model: validate it before any decision that affects people, and follow local rules and qualified review where health, money or safety are at stake.';

/** The fit the panel shows; messages about any other are dropped. */
let fit: string | null = null;
let summary: FitSummary | null = null;
let map: RegionMap | null = null;
let matrix: RegionMap[] = [];
let suspects: SuspectRow[] = [];
let theme: Theme = readTheme();

const mapView = new RegionMapView({
  choose: (x, y, reference) => {
    post({ type: 'chooseMap', x, y, reference });
    persist();
  },
  reveal: (row) => post({ type: 'revealRow', row }),
});
const matrixView = new MapMatrixView((x, y) => {
  post({ type: 'openMap', x, y });
  // The large map is where the answer lands, so take the reader there.
  mapView.root.closest('section')?.scrollIntoView({ block: 'start' });
});
const summaryView = new SummaryView((leaveOut, trees) => post({ type: 'refit', leaveOut, trees }));
const curveView = new CurveView();
const importanceView = new ImportanceView();
const votesView = new VotesView(
  (row) => post({ type: 'revealRow', row }),
  (row) => post({ type: 'explainRow', row }),
);
const contributionsView = new ContributionsView();
const dependenceView = new DependenceView((feature, output) => post({ type: 'chooseDependence', feature, output }));
const sweepView = new SweepView({
  run: () => post({ type: 'runSweep' }),
  cancel: () => post({ type: 'cancelSweep' }),
  refit: (featuresPerSplit) => post({ type: 'sweepRefit', featuresPerSplit }),
});
const suspectsView = new SuspectsView((row) => post({ type: 'revealRow', row }));
const rankingView = new RankingView();
const diagnosticsView = new DiagnosticsView();
const cvView = new CrossValidationPanel();
const rowsView = new RowsTableView({
  page: (request) => post({ type: 'rowsPage', request }),
  peek: (row) => post({ type: 'peekRow', row }),
  select: (rows, selected) => post({ type: 'selectRows', rows, selected }),
  reveal: (row) => post({ type: 'revealRow', row }),
  explain: (row) => post({ type: 'explainRow', row }),
});

const title = h('h1', {}, 'Copse');
// The same file `copse fit --report` writes, for the fit on show; the host asks where to save it.
const reportButton = custom('vscode-button', { testid: 'save-report', attrs: { secondary: '' }, title: 'Save this fit as one HTML file to share', on: { click: () => post({ type: 'saveReport' }) } }, 'Save a report…');
const statusText = h('span', { class: 'status-text' });
const progress = h('progress', { class: 'hidden', attrs: { max: '1' } });
const status = h('div', { class: 'status', testid: 'status', attrs: { role: 'status' } }, statusText, progress);
const warnings = h('ul', { class: 'warnings', testid: 'warnings' });
const warningsTitle = h('h2', {}, 'Worth checking');
const curveSection = section('curve-section', 'Out-of-bag error as trees are added', curveView.root);
const importanceSection = section('importance-section', 'What the forest leans on', importanceView.root);
const rankingSection = section('evaluation-section', 'Ranking, calibration and the decision threshold', rankingView.root);
const diagnosticsSection = section('diagnostics-section', 'Predictions against the truth', diagnosticsView.root);
const cvSection = section('cv-section', 'Cross-validation', cvView.root);

function build(): void {
  const summarySection = h('section', { class: 'card', testid: 'summary' }, h('h2', {}, 'Fit at a glance'), summaryView.root);
  append(
    document.body,
    h(
      'main',
      { class: 'panel' },
      h('header', { class: 'top' }, title, status, reportButton),
      h('p', { class: 'caution', testid: 'caution', attrs: { role: 'note' } }, CAUTION),
      // Scores first: how well the forest does decides how much any map or explanation below is worth.
      summarySection,
      rankingSection,
      diagnosticsSection,
      cvSection,
      h(
        'div',
        { class: 'columns' },
        h(
          'div',
          { class: 'col' },
          section('map-section', 'Decision regions', mapView.root),
          section('matrix-section', 'Leading feature pairs', h('p', { class: 'muted' }, 'Click a pair to open it as the large map.'), matrixView.root),
          section('dependence-section', 'How the prediction moves with one feature', dependenceView.root),
        ),
        h(
          'div',
          { class: 'col' },
          h('section', { class: 'card', testid: 'warnings-section' }, warningsTitle, warnings),
          curveSection,
          section('sweep-section', 'Features tried per split', sweepView.root),
          importanceSection,
        ),
      ),
      section('votes-section', 'Tree votes on the selected rows', votesView.root),
      section('contributions-section', 'What moved this row’s prediction', contributionsView.root),
      section('suspects-section', 'Rows the forest doubts', suspectsView.root),
      section('rows-section', 'Every training row', rowsView.root),
    ),
  );
}

function applyTheme(): void {
  theme = readTheme();
  document.body.classList.toggle('copse-hc', theme.highContrast);
  mapView.setTheme(theme);
  matrixView.setTheme(theme);
  summaryView.setTheme(theme);
  votesView.setTheme(theme);
  suspectsView.setTheme(theme);
  rowsView.setTheme(theme);
  contributionsView.setTheme(theme);
  dependenceView.setTheme(theme);
  sweepView.setTheme(theme);
  rankingView.setTheme(theme);
  drawCharts();
}

function drawCharts(): void {
  const show = summary !== null && summary.curve.length > 0;
  curveSection.classList.toggle('hidden', !show);
  importanceSection.classList.toggle('hidden', summary === null || summary.importance.length === 0);
  rankingSection.classList.toggle('hidden', summary === null || !RankingView.shows(summary));
  diagnosticsSection.classList.toggle('hidden', summary === null || !DiagnosticsView.of(summary));
  if (!summary) return;
  if (DiagnosticsView.of(summary)) diagnosticsView.draw(summary, theme);
  if (show) curveView.draw(summary, theme);
  if (summary.importance.length > 0) importanceView.draw(summary, theme);
}

function showSummary(s: FitSummary): void {
  summary = s;
  clear(title);
  append(title, 'Copse ', h('span', { class: 'muted' }, s.dataset.label), ' → ', s.target);
  document.title = `Copse: ${s.target}`;
  summaryView.set(s);
  mapView.setSummary(s);
  matrixView.setSummary(s);
  votesView.setSummary(s);
  suspectsView.setSummary(s);
  rowsView.setSummary(s);
  contributionsView.setSummary(s);
  dependenceView.setSummary(s);
  rankingView.setSummary(s);
  cvView.set(s);
  cvSection.classList.toggle('hidden', !CrossValidationPanel.of(s));
  clear(warnings);
  warningsTitle.textContent = s.warnings.length > 0 ? `Worth checking (${s.warnings.length})` : 'Worth checking';
  if (s.warnings.length === 0) append(warnings, h('li', { class: 'muted none' }, 'Nothing flagged for this fit.'));
  for (const w of s.warnings) append(warnings, h('li', {}, w));
  drawCharts();
}

function persist(): void {
  const state: PanelState = { version: PROTOCOL_VERSION, fit, summary, map, matrix, suspects, choice: mapView.choice() };
  saveState(state);
}

/** A new fit: everything drawn for the previous forest would now mislead, so every section starts empty. */
function startFit(id: string): void {
  fit = id;
  map = null;
  matrix = [];
  suspects = [];
  importanceView.reset();
  sweepView.reset();
  mapView.reset();
  matrixView.setMaps([]);
  suspectsView.setRows([]);
  votesView.setRows([]);
  window.scrollTo(0, 0);
}

function handle(msg: HostToPanel): void {
  // A slow answer about an earlier fit (or a restored panel's stale one) must not be drawn into this one.
  if (msg.type === 'summary') {
    if (msg.fit !== fit) startFit(msg.summary.fit);
  } else if (msg.fit !== fit && !(msg.type === 'status' && msg.fit === null)) {
    return;
  }
  switch (msg.type) {
    case 'summary':
      showSummary(msg.summary);
      break;
    case 'regionMap':
      map = msg.map;
      mapView.setMap(msg.map);
      break;
    case 'mapMatrix':
      matrix = msg.maps.slice(0, LIMITS.smallMaps).map((m) => ({ ...m, points: null }));
      matrixView.setMaps(matrix);
      break;
    case 'disagreement':
      votesView.setRows(msg.rows.slice(0, LIMITS.selectedRows), msg.selected);
      return; // selection-dependent: not worth restoring
    case 'suspects':
      suspects = msg.rows.slice(0, LIMITS.suspects);
      suspectsView.setRows(suspects);
      break;
    case 'highlight':
      mapView.setHighlight(msg.rows);
      suspectsView.setHighlight(msg.rows);
      return;
    // Explanations are re-sent by the host whenever the panel comes back, so they are not kept in state.
    case 'contributions':
      contributionsView.set(msg);
      return;
    case 'globalContributions':
      importanceView.setGlobal(msg.global, msg.text);
      return;
    case 'dependence':
      dependenceView.set(msg.dependence);
      return;
    case 'sweep':
      sweepView.set(msg);
      return;
    // The rows table asks again for what is in sight whenever the panel comes back, so pages are not kept in state.
    case 'rowsPage':
      rowsView.setPage(msg.query, msg.page);
      return;
    case 'rowPeek':
      rowsView.setPeek(msg.votes);
      return;
    case 'status':
      statusText.textContent = msg.text;
      status.classList.toggle('error', msg.state === 'error');
      status.classList.toggle('working', msg.state === 'working');
      progress.classList.toggle('hidden', msg.state !== 'working');
      if (msg.progress === null) progress.removeAttribute('value');
      else progress.value = msg.progress;
      return;
  }
  persist();
}

build();
applyTheme();
onThemeChange(applyTheme);

const restored = loadState();
if (restored) {
  fit = restored.fit;
  if (restored.summary) showSummary(restored.summary);
  if (restored.map) {
    map = restored.map;
    mapView.setMap(restored.map);
  }
  matrix = restored.matrix;
  matrixView.setMaps(matrix);
  suspects = restored.suspects;
  suspectsView.setRows(suspects);
}

window.addEventListener('message', (ev: MessageEvent<unknown>) => {
  if (!isHostToPanel(ev.data)) {
    // eslint-disable-next-line no-console -- the webview's developer console is the only log a panel has.
    console.warn('copse panel: ignoring a message that does not match the protocol');
    return;
  }
  handle(ev.data);
});

// The map chosen before a reload: the host draws it again instead of its default pair.
post({ type: 'ready', version: PROTOCOL_VERSION, choice: restored?.choice ?? null });
