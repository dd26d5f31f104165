// Which store blobStore() hands out follows the environment, checked by lib/env.ts.
import { afterEach, describe, expect, it } from "vitest";
import { resetServerEnvCache } from "@/lib/env";
import { blobStore, LocalDiskStore, resetBlobStore } from "@/lib/storage";
import { S3Store } from "@/lib/storage/s3";
import { FAKE_S3_CREDENTIALS, startFakeS3 } from "./fake-s3";

const NAMES = ["GRINDFADE_S3_BUCKET", "GRINDFADE_S3_ENDPOINT", "GRINDFADE_S3_REGION", "AWS_ACCESS_KEY_ID", "AWS_SECRET_ACCESS_KEY"] as const;
const saved = Object.fromEntries(NAMES.map((n) => [n, process.env[n]]));
const configure = (values: Partial<Record<(typeof NAMES)[number], string>>) => {
  for (const n of NAMES) {
    if (values[n] === undefined) delete process.env[n];
    else process.env[n] = values[n];
  }
  resetServerEnvCache();
  resetBlobStore();
};

afterEach(() => {
  configure(saved as Record<string, string>);
});

describe("blobStore()", () => {
  it("keeps files under the data directory when no bucket is configured", () => {
    configure({});
    expect(blobStore()).toBeInstanceOf(LocalDiskStore);
  });

  it("uses the configured S3 bucket, endpoint and keys", async () => {
    const s3 = await startFakeS3("grindfade-config");
    try {
      configure({
        GRINDFADE_S3_BUCKET: "grindfade-config",
        GRINDFADE_S3_ENDPOINT: s3.endpoint,
        AWS_ACCESS_KEY_ID: FAKE_S3_CREDENTIALS.accessKeyId,
        AWS_SECRET_ACCESS_KEY: FAKE_S3_CREDENTIALS.secretAccessKey,
      });
      const store = blobStore();
      expect(store).toBeInstanceOf(S3Store);
      await store.put("recordings/x.wav", new Uint8Array([1, 2, 3]));
      expect(await s3.keys()).toEqual(["recordings/x.wav"]);
    } finally {
      await s3.stop();
    }
  });

  it("fails loudly on an endpoint that is not a URL", () => {
    configure({ GRINDFADE_S3_BUCKET: "grindfade", GRINDFADE_S3_ENDPOINT: "not a url" });
    expect(() => blobStore()).toThrow(/GRINDFADE_S3_ENDPOINT/);
  });
});
