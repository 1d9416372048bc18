/**
 * The video engine's public face: probing, frame extraction, auto-follow. See README.md beside this
 * file for what each function does and the errors it throws.
 */
export { readHead, sniffMedia } from './sniff';
export { checkVideoHead, probeClip, probeFrameSet } from './probe';
export { extractFrames, framePath, frameFileName, FRAME_PATTERN, DEFAULT_MAX_SIDE } from './extract';
export { followBall, FOLLOW_DEFAULTS } from './follow';
export { applyRigid, composeRigid, invertRigid, IDENTITY, type Rigid } from './camera-motion';
export { VideoError, isVideoError, VIDEO_ERROR_CODES, type VideoErrorCode } from './errors';
export type * from './types';
