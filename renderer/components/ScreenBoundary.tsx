import { Component, useState, type ErrorInfo, type ReactNode } from 'react';
import { errorText } from '../error-text';
import { RouteLink } from './RouteLink';
import { saveBytes, savedWhere } from '../platform/bridge';
import { backupFileName, createBackup } from '../store/backup';
import { appDb } from '../store/db';

interface Props {
  /** What the screen shows, for the message ("the patient list", "patient DEMO-0001"). */
  screen: string;
  children: ReactNode;
}

/**
 * Keeps a screen that throws while drawing from blanking the whole app: the header, the caution and
 * navigation stay, and the user is told what failed and offered a backup of the store before anything
 * else is tried. App.tsx keys it by route, so going to another screen starts afresh.
 */
export class ScreenBoundary extends Component<Props, { error: unknown }> {
  override state: { error: unknown } = { error: null };

  static getDerivedStateFromError(error: unknown) {
    return { error: error ?? new Error('unknown failure') };
  }

  override componentDidCatch(error: unknown, info: ErrorInfo) {
    console.error(`Falciform: ${this.props.screen} could not be shown`, error, info.componentStack);
  }

  override render() {
    if (this.state.error === null) return this.props.children;
    return <ScreenFailed screen={this.props.screen} problem={errorText(this.state.error)} />;
  }
}

function ScreenFailed({ screen, problem }: { screen: string; problem: string }) {
  const [saved, setSaved] = useState<string | null>(null);
  const exportStore = async () => {
    try {
      const bytes = await createBackup(appDb(), 'all');
      const name = backupFileName('all');
      if (await saveBytes(name, bytes, 'application/octet-stream')) setSaved(`Backup written: ${name}.${savedWhere(name)}`);
    } catch (e) {
      setSaved(`The backup failed too: ${errorText(e)}`);
    }
  };
  return (
    <section className="notice problem screen-failed" role="alert" data-testid="screen-failed">
      <p className="notice-title">Falciform could not show {screen}.</p>
      {/* React's production build names this failure only by number (#31); say it in words first. */}
      {/React error #31|Objects are not valid as a React child/.test(problem) && (
        <p>A stored record holds a list or object where this screen expects text or a number.</p>
      )}
      <p className="notice-problem" data-testid="screen-failed-problem">{problem.length > 300 ? `${problem.slice(0, 300)}…` : problem}</p>
      <p>
        Nothing stored was changed. The rest of the app still works: go back to the patient list, or back up the
        whole store now so that nothing is lost before anyone looks into it.
      </p>
      <p className="screen-failed-actions">
        <button type="button" className="primary" onClick={() => void exportStore()} data-testid="screen-failed-backup">
          Back up all patients…
        </button>
        <RouteLink to={{ screen: 'patients' }} data-testid="screen-failed-home">Patient list</RouteLink>
      </p>
      {saved && <p role="status" data-testid="screen-failed-saved">{saved}</p>}
    </section>
  );
}
