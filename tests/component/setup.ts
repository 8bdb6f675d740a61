// happy-dom has no 2D canvas and no Path2D; uPlot (charts) needs both just to construct, so stub them here.
import { vi } from 'vitest'

type Ctx2D = Record<string, unknown>

function fakeContext(canvas: HTMLCanvasElement): Ctx2D {
  const noop = () => undefined
  const ctx: Ctx2D = { canvas }
  for (const name of [
    'arc',
    'arcTo',
    'beginPath',
    'bezierCurveTo',
    'clearRect',
    'clip',
    'closePath',
    'drawImage',
    'ellipse',
    'fill',
    'fillRect',
    'fillText',
    'lineTo',
    'moveTo',
    'quadraticCurveTo',
    'rect',
    'resetTransform',
    'restore',
    'rotate',
    'save',
    'scale',
    'setLineDash',
    'setTransform',
    'stroke',
    'strokeRect',
    'strokeText',
    'transform',
    'translate',
    'putImageData',
  ]) {
    ctx[name] = noop
  }
  ctx.measureText = (text: string) => ({ width: text.length * 6, actualBoundingBoxAscent: 8, actualBoundingBoxDescent: 2 })
  ctx.getLineDash = () => []
  ctx.createLinearGradient = () => ({ addColorStop: noop })
  ctx.createRadialGradient = () => ({ addColorStop: noop })
  ctx.createPattern = () => null
  ctx.getImageData = (_x: number, _y: number, w: number, h: number) => ({ data: new Uint8ClampedArray(w * h * 4), width: w, height: h })
  ctx.isPointInPath = () => false
  return ctx
}

const contexts = new WeakMap<HTMLCanvasElement, Ctx2D>()
Object.defineProperty(HTMLCanvasElement.prototype, 'getContext', {
  configurable: true,
  value: function getContext(this: HTMLCanvasElement, kind: string) {
    if (kind !== '2d') return null
    let ctx = contexts.get(this)
    if (!ctx) contexts.set(this, (ctx = fakeContext(this)))
    return ctx
  },
})

if (typeof globalThis.Path2D === 'undefined') {
  class FakePath2D {
    addPath() {}
    arc() {}
    arcTo() {}
    bezierCurveTo() {}
    closePath() {}
    ellipse() {}
    lineTo() {}
    moveTo() {}
    quadraticCurveTo() {}
    rect() {}
  }
  Object.defineProperty(globalThis, 'Path2D', { configurable: true, writable: true, value: FakePath2D })
}

// A quiet, predictable colour-scheme query (light) unless a test replaces it.
if (typeof window.matchMedia !== 'function') {
  Object.defineProperty(window, 'matchMedia', {
    configurable: true,
    writable: true,
    value: vi.fn((query: string) => ({
      matches: false,
      media: query,
      onchange: null,
      addEventListener: () => undefined,
      removeEventListener: () => undefined,
      addListener: () => undefined,
      removeListener: () => undefined,
      dispatchEvent: () => false,
    })),
  })
}
