# OpenCV's side of the remap bench, one measurement per process like bench/measure.mjs:
#   /usr/bin/python3 bench/opencv-remap.py float|fixed WORKDIR REPS
# prints one JSON line { case, times: [ms, ...], version, agreement? }. cv2.remap with INTER_LINEAR,
# BORDER_CONSTANT, one thread (cv2.setNumThreads(1)), on the same 4096² source and the same demo-rig
# map as skyfold; "fixed" first converts the float maps with cv2.convertMaps(..., CV_16SC2), the
# fixed-point form OpenCV's documentation recommends for repeated remaps (cv::convertMaps), once,
# untimed. numpy's default allocation is used (what a user of cv2 gets).
import json, sys, time

case, d, reps = sys.argv[1], sys.argv[2], int(sys.argv[3])
try:
    import cv2
    import numpy as np
except Exception as e:  # the caller reports the bench row as skipped, with this reason
    print(json.dumps({"case": "opencv-" + case, "skipped": "cv2 unavailable: " + str(e)}), flush=True)
    sys.exit(0)

info = json.load(open(d + "/map.json"))
n, w, h = info["source"], info["width"], info["height"]
cv2.setNumThreads(1)
src = np.fromfile(d + "/src.u8", np.uint8).reshape(n, n, 3)
# skyfold's pixel centres sit at +0.5, OpenCV's at integers; an unlit pixel (NaN) goes far outside
mx = np.nan_to_num(np.fromfile(d + "/map-x.f32", np.float32).reshape(h, w) - 0.5, nan=-16.0)
my = np.nan_to_num(np.fromfile(d + "/map-y.f32", np.float32).reshape(h, w) - 0.5, nan=-16.0)
if case == "fixed":
    m1, m2 = cv2.convertMaps(mx, my, cv2.CV_16SC2)
elif case == "float":
    m1, m2 = mx, my
else:
    sys.exit("opencv-remap: unknown case " + case)
out = np.zeros((h, w, 3), np.uint8)

def run():
    cv2.remap(src, m1, m2, cv2.INTER_LINEAR, dst=out, borderMode=cv2.BORDER_CONSTANT, borderValue=0)

run()
times = []
for _ in range(reps):
    t0 = time.perf_counter()
    run()
    times.append((time.perf_counter() - t0) * 1000)
result = {"case": "opencv-" + case, "times": times, "version": cv2.__version__}
try:
    if case != "fixed":
        raise FileNotFoundError  # skyfold's fixed-point output is compared with OpenCV's fixed-point one
    ours = np.fromfile(d + "/ours-bilinear.u8", np.uint8).reshape(h, w, 3).astype(np.int16)
    # interior: all four bilinear neighbours inside the source (at the border OpenCV blends with its
    # constant border, skyfold clamps), and lit
    inner = (mx >= 0) & (mx < n - 1) & (my >= 0) & (my < n - 1)
    diff = np.abs(out.astype(np.int16) - ours)[inner]
    result["agreement"] = {"pixels": int(inner.sum()), "meanAbs": float(diff.mean()), "maxAbs": int(diff.max()), "fractionOver1": float((diff > 1).mean())}
except FileNotFoundError:
    pass
print(json.dumps(result), flush=True)
