'use client';

import SignaturePad from 'signature_pad';
import { useEffect, useImperativeHandle, useRef, useState, type Ref } from 'react';
import { signatureOf, type SignatureResult } from './signature';

export type SignaturePadHandle = { read: () => SignatureResult; clear: () => void };

type Props = { ref?: Ref<SignaturePadHandle>; label: string; error?: string | null; disabled?: boolean; onChange?: (empty: boolean) => void };

/**
 * A pad to sign on with a finger, pen or mouse (signature_pad), with a Clear button. `read()` gives the strokes in
 * whole CSS pixels of the pad, as review:approved stores them. The drawing survives a resize of the pad.
 */
export function SignatureField({ ref, label, error, disabled, onChange }: Props) {
  const canvas = useRef<HTMLCanvasElement>(null);
  const pad = useRef<SignaturePad | null>(null);
  const [empty, setEmpty] = useState(true);
  const onChangeRef = useRef(onChange);
  onChangeRef.current = onChange;

  useEffect(() => {
    const el = canvas.current;
    if (!el) return;
    const p = new SignaturePad(el, { penColor: '#14171b', minWidth: 0.8, maxWidth: 2.6, backgroundColor: 'rgba(0,0,0,0)' });
    pad.current = p;
    const fit = () => {
      // Draw at the screen's pixel density; signature_pad reports points in CSS pixels either way.
      const ratio = Math.max(window.devicePixelRatio || 1, 1);
      const data = p.toData();
      el.width = el.offsetWidth * ratio;
      el.height = el.offsetHeight * ratio;
      el.getContext('2d')?.scale(ratio, ratio);
      p.clear();
      if (data.length > 0) p.fromData(data);
    };
    fit();
    const changed = () => {
      setEmpty(p.isEmpty());
      onChangeRef.current?.(p.isEmpty());
    };
    p.addEventListener('endStroke', changed);
    const resize = new ResizeObserver(() => fit());
    resize.observe(el);
    return () => {
      resize.disconnect();
      p.removeEventListener('endStroke', changed);
      p.off();
      pad.current = null;
    };
  }, []);

  useEffect(() => {
    if (!pad.current) return;
    if (disabled) pad.current.off();
    else pad.current.on();
  }, [disabled]);

  const clear = () => {
    pad.current?.clear();
    setEmpty(true);
    onChangeRef.current?.(true);
  };

  useImperativeHandle(
    ref,
    () => ({
      read: () => {
        const el = canvas.current;
        const p = pad.current;
        if (!el || !p) return { ok: false, reason: 'the pad is not ready' };
        return signatureOf(p.toData(), el.offsetWidth, el.offsetHeight);
      },
      clear,
    }),
    [],
  );

  return (
    <div className="grid gap-1" role="group" aria-labelledby="signature-label">
      <div className="flex items-center justify-between gap-2">
        <span id="signature-label" className="font-semibold">
          {label}
        </span>
        <button type="button" onClick={clear} disabled={disabled || empty} className="min-h-9 rounded-lg border-2 border-ink px-3 text-sm font-semibold hover:bg-paper disabled:opacity-40">
          Clear
        </button>
      </div>
      <div className={`relative rounded-lg border-2 bg-card ${error ? 'border-fail' : 'border-ink'}`}>
        <canvas
          ref={canvas}
          data-testid="signature-pad"
          aria-label="Signature pad: draw your signature here"
          aria-invalid={error ? true : undefined}
          className="block h-40 w-full touch-none"
        />
        <span aria-hidden className="pointer-events-none absolute inset-x-4 bottom-8 border-b border-dashed border-ink-soft" />
        {empty && (
          <span aria-hidden className="pointer-events-none absolute inset-x-0 top-1/3 text-center text-ink-soft">
            Sign here
          </span>
        )}
      </div>
      {error && (
        <p role="alert" className="text-sm font-semibold text-fail">
          Signature: {error}
        </p>
      )}
    </div>
  );
}
