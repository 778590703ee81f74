// Which stored scope images make up each waveform view.
import type { FrameImageKind } from './frame-api'

export type WaveformView = 'luma' | 'flat' | 'both' | 'rgb'
export const WAVEFORM_VIEWS: readonly WaveformView[] = ['luma', 'flat', 'both', 'rgb']

export function waveformPanes(view: WaveformView): Array<{ kind: FrameImageKind, label: string }> {
  switch (view) {
    case 'luma': return [{ kind: 'waveform-luma', label: 'Luma' }]
    case 'flat': return [{ kind: 'waveform-flat', label: 'Flat (luma + chroma)' }]
    case 'both': return [{ kind: 'waveform-luma', label: 'Luma' }, { kind: 'waveform-flat', label: 'Flat (luma + chroma)' }]
    case 'rgb': return [{ kind: 'waveform-rgb', label: 'RGB split: R′, G′, B′' }]
  }
}
