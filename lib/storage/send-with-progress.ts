// One upload from the browser with its progress: fetch cannot report the bytes sent, so this
// uses XMLHttpRequest's upload events. Answers the status and the JSON body (or {}), as fetch
// would be read; a network failure rejects.
export interface SentAnswer {
  status: number;
  ok: boolean;
  body: Record<string, unknown>;
}

export function sendWithProgress(
  url: string,
  init: { method: string; headers?: Record<string, string>; body: Blob },
  onProgress: (sent: number, total: number) => void,
): Promise<SentAnswer> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open(init.method, url);
    for (const [k, v] of Object.entries(init.headers ?? {})) xhr.setRequestHeader(k, v);
    xhr.upload.onprogress = (e) =>
      onProgress(e.loaded, e.lengthComputable ? e.total : init.body.size);
    xhr.onload = () => {
      let body: Record<string, unknown> = {};
      try {
        body = JSON.parse(xhr.responseText) as Record<string, unknown>;
      } catch {
        /* not JSON */
      }
      resolve({ status: xhr.status, ok: xhr.status >= 200 && xhr.status < 300, body });
    };
    xhr.onerror = () => reject(new Error("the network dropped; try again"));
    xhr.onabort = () => reject(new Error("the upload was stopped"));
    xhr.send(init.body);
  });
}
