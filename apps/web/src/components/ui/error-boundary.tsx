import { Component, type ErrorInfo, type ReactNode } from 'react';

/** Keeps one failing panel from taking the whole screen down. */
export class ErrorBoundary extends Component<
  { name: string; children: ReactNode },
  { error: Error | null }
> {
  state: { error: Error | null } = { error: null };

  static getDerivedStateFromError(error: Error) {
    return { error };
  }

  componentDidCatch(error: Error, info: ErrorInfo) {
    console.error(`${this.props.name} failed`, error, info.componentStack);
  }

  render() {
    if (this.state.error) {
      return (
        <div
          role="alert"
          className="rounded border border-red-300 bg-red-50 p-3 text-sm text-red-800"
        >
          <p className="font-semibold">{this.props.name} could not be shown.</p>
          <p className="mt-1">{this.state.error.message}</p>
          <button
            type="button"
            className="mt-2 text-tide-700 underline"
            onClick={() => this.setState({ error: null })}
          >
            Try again
          </button>
        </div>
      );
    }
    return this.props.children;
  }
}
