"""Reads a PNG with Pillow (Debian's python3-pil) and prints its size, mode and the RGB of the asked pixels as JSON.
Usage: key_image_png.py FILE X,Y [X,Y ...]"""
import json, sys
from PIL import Image

im = Image.open(sys.argv[1])
im.load()
px = [list(im.getpixel(tuple(int(c) for c in p.split(',')))) for p in sys.argv[2:]]
print(json.dumps({'size': list(im.size), 'mode': im.mode, 'pixels': px}))
