// @20minutes/s3rver ships no types; only what tests/support/fake-s3.ts uses.
declare module '@20minutes/s3rver' {
  export default class S3rver {
    constructor(options: { port: number, address: string, directory: string, silent?: boolean, allowMismatchedSignatures?: boolean, configureBuckets?: { name: string }[] })
    run(): Promise<unknown>
    close(): Promise<void>
  }
}
