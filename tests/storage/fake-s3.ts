// A throwaway S3-compatible server for tests: s3rver on 127.0.0.1, a free port, its own directory.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { CreateBucketCommand, ListObjectsV2Command, S3Client } from "@aws-sdk/client-s3";
import S3rver from "s3rver";

/** s3rver checks request signatures against this fixed key pair. */
export const FAKE_S3_CREDENTIALS = { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" };

export async function startFakeS3(bucket: string) {
  const directory = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-s3-"));
  const server = new S3rver({ address: "127.0.0.1", port: 0, directory, silent: true });
  const { port } = await server.run();
  const endpoint = `http://127.0.0.1:${port}`;
  const client = new S3Client({ region: "us-east-1", endpoint, forcePathStyle: true, credentials: FAKE_S3_CREDENTIALS });
  await client.send(new CreateBucketCommand({ Bucket: bucket }));
  return {
    endpoint,
    /** Every key in the bucket, to show that nothing was left behind. */
    async keys(): Promise<string[]> {
      const res = await client.send(new ListObjectsV2Command({ Bucket: bucket }));
      return (res.Contents ?? []).map((o) => o.Key!).sort();
    },
    async stop() {
      client.destroy();
      await server.close();
      fs.rmSync(directory, { recursive: true, force: true });
    },
  };
}
