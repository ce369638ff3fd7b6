import { Component, type ReactNode } from 'react';
import { useLocation } from 'react-router';
import { Button } from '../ui/Button';
import { Loading } from '../ui/States';

/** What a page shows while its chunk loads. */
export function PageLoading() {
  return (
    <div className="mx-auto max-w-6xl px-6 pt-10">
      <Loading />
    </div>
  );
}

interface BoundaryState {
  error: Error | null;
}

class Boundary extends Component<{ children: ReactNode; address: string }, BoundaryState> {
  override state: BoundaryState = { error: null };

  static getDerivedStateFromError(error: unknown): BoundaryState {
    return { error: error instanceof Error ? error : new Error(String(error)) };
  }

  override componentDidUpdate(previous: { address: string }) {
    if (this.state.error && previous.address !== this.props.address) this.setState({ error: null });
  }

  override render() {
    const { error } = this.state;
    if (!error) return this.props.children;
    return (
      <div className="mx-auto max-w-6xl px-6 pt-10">
        <div role="alert" className="my-4 flex items-baseline gap-4 border-l-2 border-danger py-1 pl-3 text-sm">
          <span className="text-danger">This page could not be shown: {error.message}</span>
          <Button variant="quiet" onClick={() => window.location.reload()}>
            Reload
          </Button>
        </div>
      </div>
    );
  }
}

/**
 * A page that failed to load or to render shows its error instead of a blank window. The usual cause
 * of a failed load is a new version of the client whose chunks replaced the ones this tab knows,
 * which a reload fixes. Moving to another address starts afresh.
 */
export function PageBoundary({ children }: { children: ReactNode }) {
  const location = useLocation();
  return <Boundary address={location.pathname}>{children}</Boundary>;
}
