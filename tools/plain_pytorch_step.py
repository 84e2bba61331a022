"""Side-by-side figure for README "Speed": one learning step of Corral's default network
(4 levels, 16 channels, batch normalisation, nearest-neighbour upsampling, 2 outputs) in plain
PyTorch eager, batch 8 of 128x128, 2 threads, Adam, a one-line loss. Prints the median seconds
per step of steps 11-60, and forward / backward apart.

    /usr/bin/python3 tools/plain_pytorch_step.py [channels] [cl]   # needs Debian's python3-torch

"cl" runs in channels-last memory layout. Not part of Corral or its tests.
"""
import statistics
import sys
import time

import torch
import torch.nn as nn
import torch.nn.functional as F


def double_conv(i, o):
    return nn.Sequential(nn.Conv2d(i, o, 3, padding=1, bias=False), nn.BatchNorm2d(o), nn.ReLU(),
                         nn.Conv2d(o, o, 3, padding=1, bias=False), nn.BatchNorm2d(o), nn.ReLU())


class Net(nn.Module):
    def __init__(self, cin=1, base=16, levels=4, outputs=2):
        super().__init__()
        w = [base << i for i in range(levels)]
        self.down = nn.ModuleList([double_conv(cin if i == 0 else w[i - 1], w[i]) for i in range(levels)])
        self.up = nn.ModuleList([double_conv(w[i] + w[i + 1], w[i]) for i in range(levels - 1)])
        self.head = nn.Conv2d(base, outputs, 1)
        self.levels = levels

    def forward(self, x):
        skips = []
        for i in range(self.levels):
            x = self.down[i](x)
            if i < self.levels - 1:
                skips.append(x)
                x = F.max_pool2d(x, 2)
        for i in range(self.levels - 2, -1, -1):
            x = F.interpolate(x, scale_factor=2, mode='nearest')
            x = self.up[i](torch.cat([skips[i], x], 1))
        return self.head(x)


def main():
    torch.set_num_threads(2)
    torch.manual_seed(1)
    cin = int(sys.argv[1]) if len(sys.argv) > 1 else 1
    channels_last = len(sys.argv) > 2 and sys.argv[2] == 'cl'
    net = Net(cin)
    opt = torch.optim.Adam(net.parameters(), 2e-3)
    x = torch.rand(8, cin, 128, 128)
    y = (torch.rand(8, 2, 128, 128) > 0.5).float()
    if channels_last:
        net = net.to(memory_format=torch.channels_last)
        x = x.contiguous(memory_format=torch.channels_last)
    fw, bw, step = [], [], []
    for _ in range(60):
        t0 = time.perf_counter()
        opt.zero_grad()
        loss = F.binary_cross_entropy_with_logits(net(x), y)
        t1 = time.perf_counter()
        loss.backward()
        t2 = time.perf_counter()
        opt.step()
        t3 = time.perf_counter()
        fw.append(t1 - t0)
        bw.append(t2 - t1)
        step.append(t3 - t0)
    med = lambda v: statistics.median(v[10:])
    print('torch %s, %d channel(s), %s: %.3f s/step (forward %.3f, backward %.3f)' % (
        torch.__version__, cin, 'channels-last' if channels_last else 'NCHW', med(step), med(fw), med(bw)))


if __name__ == '__main__':
    main()
