// Gathers the microphone's 128-frame render quanta into larger blocks and posts them to the
// analysis Worker. Only the first channel is used: lapping is
// judged on one microphone.
class GrindfadeCapture extends AudioWorkletProcessor {
  constructor(options) {
    super();
    const size = (options && options.processorOptions && options.processorOptions.blockSize) || 1024;
    // Kept apart from the block: a transferred block is detached and reads as length 0.
    this.size = size;
    this.block = new Float32Array(size);
    this.filled = 0;
    // Blocks go straight to the analysis Worker over a port the page hands over, so the page's
    // own thread never carries audio.
    this.out = this.port;
    this.port.onmessage = (e) => {
      if (e.data && e.data.type === "connect" && e.data.port) {
        this.out = e.data.port;
      } else if (e.data === "flush" && this.filled > 0) {
        this.out.postMessage(this.block.slice(0, this.filled));
        this.filled = 0;
      }
    };
  }

  process(inputs) {
    const input = inputs[0];
    const channel = input && input[0];
    if (channel) {
      let offset = 0;
      while (offset < channel.length) {
        const n = Math.min(channel.length - offset, this.block.length - this.filled);
        this.block.set(channel.subarray(offset, offset + n), this.filled);
        this.filled += n;
        offset += n;
        if (this.filled === this.block.length) {
          const out = this.block;
          this.out.postMessage(out, [out.buffer]);
          this.block = new Float32Array(this.size);
          this.filled = 0;
        }
      }
    }
    return true;
  }
}

registerProcessor("grindfade-capture", GrindfadeCapture);
