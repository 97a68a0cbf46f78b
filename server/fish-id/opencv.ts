import cvModule from '@techstark/opencv-js'

// OpenCV's WebAssembly build; importing this file starts it (compiling 7 MB of WebAssembly), so code
// that may not need it, like the demo seed with cached features, imports this file only when it does.
// Its export is a thenable that resolves to itself, so awaiting it (or resolving a promise or
// returning from an async function with it, or a dynamic import() whose namespace carries its
// `then`) never settles: wait until the runtime has put its classes in place, then hand the module
// out synchronously through `openCv()`.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type OpenCv = any

const cv = cvModule as OpenCv
let ready: Promise<void> | undefined

/** Resolves (with nothing) once OpenCV can be used through `openCv()`. */
export function loadOpenCv(): Promise<void> {
  ready ??= new Promise((resolve, reject) => {
    const started = Date.now()
    const check = () => {
      if (typeof cv.Mat === 'function') return resolve()
      if (Date.now() - started > 60_000) return reject(new Error('OpenCV did not start within 60 s'))
      setTimeout(check, 5)
    }
    check()
  })
  return ready
}

export function openCv(): OpenCv {
  if (typeof cv.Mat !== 'function') throw new Error('OpenCV is not loaded yet: await loadOpenCv() first')
  return cv
}
