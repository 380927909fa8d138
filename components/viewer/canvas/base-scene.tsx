'use client';

import { Canvas, useThree } from '@react-three/fiber';
import { useEffect, useLayoutEffect, useMemo } from 'react';
import { BufferGeometry, PlaneGeometry } from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';

export type SceneScrew = { id: string; label: string; xMm: number; yMm: number };
export type SceneProps = {
  screws: SceneScrew[];
  /** Slopes in µrad: positive X rises toward +x (right), positive Y toward +y (back). */
  slopeXUrad: number;
  slopeYUrad: number;
  exaggeration: number;
  /** Where the last reading was taken, mm from the table centre; null before the first. */
  levelAt: { xMm: number; yMm: number; axis: 'x' | 'y' } | null;
};

const MM = 0.001; // scene units are metres; machine y (toward the back) is drawn along -z

function heightM(p: SceneProps, xMm: number, yMm: number): number {
  return (p.slopeXUrad * 1e-6 * xMm + p.slopeYUrad * 1e-6 * yMm) * p.exaggeration * MM;
}

function Controls() {
  const { camera, gl, invalidate } = useThree();
  useEffect(() => {
    const controls = new OrbitControls(camera, gl.domElement);
    controls.enableDamping = false;
    controls.maxPolarAngle = Math.PI / 2.1;
    // The scene is drawn on demand: only when the base model changes or the view is turned.
    controls.addEventListener('change', () => invalidate());
    return () => controls.dispose();
  }, [camera, gl, invalidate]);
  return null;
}

function BaseSurface(p: SceneProps & { halfX: number; halfY: number }) {
  const geometry = useMemo<BufferGeometry>(() => new PlaneGeometry(p.halfX * 2 * MM, p.halfY * 2 * MM, 24, 24).rotateX(-Math.PI / 2), [p.halfX, p.halfY]);
  const invalidate = useThree((state) => state.invalidate);
  useLayoutEffect(() => {
    const pos = geometry.getAttribute('position');
    for (let i = 0; i < pos.count; i++) {
      const xMm = pos.getX(i) / MM;
      const yMm = -pos.getZ(i) / MM;
      pos.setY(i, heightM(p, xMm, yMm));
    }
    pos.needsUpdate = true;
    geometry.computeVertexNormals();
    invalidate();
  });
  return (
    <mesh geometry={geometry} castShadow receiveShadow>
      <meshStandardMaterial color="#8fa3b3" metalness={0.35} roughness={0.55} flatShading />
    </mesh>
  );
}

/** The tilt view: the base drawn from the slopes, raised by the exaggeration factor, screws at their footprint. */
export function BaseScene(p: SceneProps) {
  const halfX = Math.max(400, ...p.screws.map((s) => Math.abs(s.xMm))) + 150;
  const halfY = Math.max(300, ...p.screws.map((s) => Math.abs(s.yMm))) + 150;
  const span = Math.max(halfX, halfY) * MM;
  return (
    <Canvas frameloop="demand" camera={{ position: [span * 1.6, span * 1.3, span * 2.1], fov: 40 }} shadows dpr={[1, 2]} data-testid="tilt-canvas">
      <color attach="background" args={['#e9e6dc']} />
      <ambientLight intensity={0.7} />
      <directionalLight position={[2, 4, 3]} intensity={1.6} castShadow />
      <Controls />
      <gridHelper args={[span * 4, 20, '#b9b3a3', '#d3cec0']} position={[0, -0.32, 0]} />
      <BaseSurface {...p} halfX={halfX} halfY={halfY} />
      {p.screws.map((s) => {
        const top = heightM(p, s.xMm, s.yMm);
        return (
          <mesh key={s.id} position={[s.xMm * MM, (top - 0.32) / 2, -s.yMm * MM]}>
            <cylinderGeometry args={[0.035, 0.035, Math.max(0.01, top + 0.32), 20]} />
            <meshStandardMaterial color="#f2a516" metalness={0.5} roughness={0.4} />
          </mesh>
        );
      })}
      {p.levelAt && (
        <mesh position={[p.levelAt.xMm * MM, heightM(p, p.levelAt.xMm, p.levelAt.yMm) + 0.03, -p.levelAt.yMm * MM]} rotation={[0, p.levelAt.axis === 'x' ? 0 : Math.PI / 2, 0]}>
          <boxGeometry args={[0.25, 0.05, 0.06]} />
          <meshStandardMaterial color="#c6e23a" />
        </mesh>
      )}
      {/* A front marker so the operator's side is never in doubt. */}
      <mesh position={[0, -0.3, (halfY + 120) * MM]}>
        <boxGeometry args={[0.4, 0.02, 0.05]} />
        <meshStandardMaterial color="#14171b" />
      </mesh>
    </Canvas>
  );
}
