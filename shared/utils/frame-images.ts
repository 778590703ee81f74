// The images the worker stores for every analysed frame, served as /api/frames/:id/images/:kind.
// The worker, the route and the app all take the list from here.

export const FRAME_IMAGE_KINDS = ['thumb', 'picture', 'overlay', 'waveform-luma', 'waveform-flat', 'waveform-rgb', 'vectorscope'] as const
export type FrameImageKind = (typeof FRAME_IMAGE_KINDS)[number]

/** Width of the thumbnail in the frames table. */
export const THUMB_WIDTH = 320
/** Width of the viewing copy: sharp on a large screen, a fraction of a 4K original's bytes. */
export const PICTURE_WIDTH = 1600
