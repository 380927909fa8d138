'use client';

import dynamic from 'next/dynamic';
import { Component, type ReactNode } from 'react';
import type { SceneProps } from './canvas/base-scene';

export type { SceneMove, SceneProps, SceneScrew } from './canvas/base-scene';

/** three.js loads only where the tilt view is drawn, and only in the browser. */
const BaseScene = dynamic(() => import('./canvas/base-scene').then((m) => m.BaseScene), {
  ssr: false,
  loading: () => <p className="grid h-full place-items-center text-ink-soft">Loading the tilt view…</p>,
});

class CanvasBoundary extends Component<{ children: ReactNode }, { failed: boolean }> {
  state = { failed: false };
  static getDerivedStateFromError() {
    return { failed: true };
  }
  render() {
    return this.state.failed ? (
      <p role="alert" className="grid h-full place-items-center p-6 text-center text-fail">
        This browser could not start 3D drawing (WebGL). The readings and figures beside it are unaffected.
      </p>
    ) : (
      this.props.children
    );
  }
}

export function TiltView(props: SceneProps) {
  return (
    <CanvasBoundary>
      <BaseScene {...props} />
    </CanvasBoundary>
  );
}
