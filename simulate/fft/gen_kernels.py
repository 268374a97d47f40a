#!/usr/bin/python3
"""Writes kernels_gen.go, the radix-2, 3, 4, 5 and 8 passes of package fft.

Each butterfly is written once below, on real and imaginary parts, with
$IN(k) for butterfly input k and $ST(i) for "store output i from (vr, vi)".
The script expands every body into the pass kernels of kernels.go's contract:
the twiddled pass rR (groups 1..m-1), the stride-1 first pass rRs1 (radix 4
and 8), the scaled last pass rRlast and the twiddle-free rRnotw. Run it with
go generate (see kernels.go); it needs only Python 3 and gofmt.
"""
import re
import subprocess

# Butterfly bodies; the radix-8 one reads its inputs again for the odd half.
bodies = {}
bodies[2] = """
u, v := $IN(0), $IN(1)
vr, vi := real(u)+real(v), imag(u)+imag(v)
$ST(0)
vr, vi = real(u)-real(v), imag(u)-imag(v)
$ST(1)
"""
bodies[3] = """
a := $IN(0)
u, v := $IN(1), $IN(2)
t1r, t1i := real(u)+real(v), imag(u)+imag(v)
t3r, t3i := sin60*(imag(u)-imag(v)), sin60*(real(v)-real(u))
vr, vi := real(a)+t1r, imag(a)+t1i
$ST(0)
t2r, t2i := real(a)-0.5*t1r, imag(a)-0.5*t1i
vr, vi = t2r+t3r, t2i+t3i
$ST(1)
vr, vi = t2r-t3r, t2i-t3i
$ST(2)
"""
bodies[4] = """
u, v := $IN(0), $IN(2)
t0r, t0i := real(u)+real(v), imag(u)+imag(v)
t1r, t1i := real(u)-real(v), imag(u)-imag(v)
u, v = $IN(1), $IN(3)
t2r, t2i := real(u)+real(v), imag(u)+imag(v)
t3r, t3i := real(u)-real(v), imag(u)-imag(v)
vr, vi := t0r+t2r, t0i+t2i
$ST(0)
vr, vi = t0r-t2r, t0i-t2i
$ST(2)
vr, vi = t1r+t3i, t1i-t3r
$ST(1)
vr, vi = t1r-t3i, t1i+t3r
$ST(3)
"""
bodies[5] = """
a := $IN(0)
x0r, x0i := real(a), imag(a)
u, v := $IN(1), $IN(4)
a1r, a1i := real(u)+real(v), imag(u)+imag(v)
b1r, b1i := real(u)-real(v), imag(u)-imag(v)
u, v = $IN(2), $IN(3)
a2r, a2i := real(u)+real(v), imag(u)+imag(v)
b2r, b2i := real(u)-real(v), imag(u)-imag(v)
vr, vi := x0r+a1r+a2r, x0i+a1i+a2i
$ST(0)
r1r, r1i := x0r+cos72*a1r+cos144*a2r, x0i+cos72*a1i+cos144*a2i
i1r, i1i := sin72*b1i+sin144*b2i, -(sin72*b1r + sin144*b2r)
vr, vi = r1r+i1r, r1i+i1i
$ST(1)
vr, vi = r1r-i1r, r1i-i1i
$ST(4)
r2r, r2i := x0r+cos144*a1r+cos72*a2r, x0i+cos144*a1i+cos72*a2i
i2r, i2i := sin144*b1i-sin72*b2i, sin72*b2r-sin144*b1r
vr, vi = r2r+i2r, r2i+i2i
$ST(2)
vr, vi = r2r-i2r, r2i-i2i
$ST(3)
"""
bodies[8] = """
u, v := $IN(0), $IN(4)
a0r, a0i := real(u)+real(v), imag(u)+imag(v)
u, v = $IN(2), $IN(6)
a2r, a2i := real(u)+real(v), imag(u)+imag(v)
b0r, b0i := a0r+a2r, a0i+a2i
b2r, b2i := a0r-a2r, a0i-a2i
u, v = $IN(1), $IN(5)
a1r, a1i := real(u)+real(v), imag(u)+imag(v)
u, v = $IN(3), $IN(7)
a3r, a3i := real(u)+real(v), imag(u)+imag(v)
b1r, b1i := a1r+a3r, a1i+a3i
b3r, b3i := a1i-a3i, a3r-a1r
vr, vi := b0r+b1r, b0i+b1i
$ST(0)
vr, vi = b0r-b1r, b0i-b1i
$ST(4)
vr, vi = b2r+b3r, b2i+b3i
$ST(2)
vr, vi = b2r-b3r, b2i-b3i
$ST(6)
u, v = $IN(1), $IN(5)
a5r, a5i := real(u)-real(v), imag(u)-imag(v)
u, v = $IN(3), $IN(7)
a7r, a7i := real(u)-real(v), imag(u)-imag(v)
er, ei := a5r-a7r, a5i-a7i
fr, fi := a5r+a7r, a5i+a7i
d1r, d1i := (er+fi)*sqrtH, (ei-fr)*sqrtH
d3r, d3i := (fi-er)*sqrtH, -(ei+fr)*sqrtH
u, v = $IN(0), $IN(4)
a4r, a4i := real(u)-real(v), imag(u)-imag(v)
u, v = $IN(2), $IN(6)
a6r, a6i := real(u)-real(v), imag(u)-imag(v)
d0r, d0i := a4r+a6i, a4i-a6r
d2r, d2i := a4r-a6i, a4i+a6r
vr, vi = d0r+d1r, d0i+d1i
$ST(1)
vr, vi = d0r-d1r, d0i-d1i
$ST(5)
vr, vi = d2r+d3r, d2i+d3i
$ST(3)
vr, vi = d2r-d3r, d2i-d3i
$ST(7)
"""
# The last and twiddle-free kernels may run in place, so their radix-8 body
# reads all inputs before the first store.
bodies8last = """
u, v := $IN(0), $IN(4)
a0r, a0i := real(u)+real(v), imag(u)+imag(v)
a4r, a4i := real(u)-real(v), imag(u)-imag(v)
u, v = $IN(2), $IN(6)
a2r, a2i := real(u)+real(v), imag(u)+imag(v)
a6r, a6i := real(u)-real(v), imag(u)-imag(v)
u, v = $IN(1), $IN(5)
a1r, a1i := real(u)+real(v), imag(u)+imag(v)
a5r, a5i := real(u)-real(v), imag(u)-imag(v)
u, v = $IN(3), $IN(7)
a3r, a3i := real(u)+real(v), imag(u)+imag(v)
a7r, a7i := real(u)-real(v), imag(u)-imag(v)
b0r, b0i := a0r+a2r, a0i+a2i
b2r, b2i := a0r-a2r, a0i-a2i
b1r, b1i := a1r+a3r, a1i+a3i
b3r, b3i := a1i-a3i, a3r-a1r
vr, vi := b0r+b1r, b0i+b1i
$ST(0)
vr, vi = b0r-b1r, b0i-b1i
$ST(4)
vr, vi = b2r+b3r, b2i+b3i
$ST(2)
vr, vi = b2r-b3r, b2i-b3i
$ST(6)
er, ei := a5r-a7r, a5i-a7i
fr, fi := a5r+a7r, a5i+a7i
d1r, d1i := (er+fi)*sqrtH, (ei-fr)*sqrtH
d3r, d3i := (fi-er)*sqrtH, -(ei+fr)*sqrtH
d0r, d0i := a4r+a6i, a4i-a6r
d2r, d2i := a4r-a6i, a4i+a6r
vr, vi = d0r+d1r, d0i+d1i
$ST(1)
vr, vi = d0r-d1r, d0i-d1i
$ST(5)
vr, vi = d2r+d3r, d2i+d3i
$ST(3)
vr, vi = d2r-d3r, d2i-d3i
$ST(7)
"""
docs = {
 2: "r2 is the radix-2 pass: v0 = x0 + x1, v1 = x0 - x1.",
 3: "r3 is the radix-3 pass: with t = x1 + x2, v0 = x0 + t and\n// v1, v2 = x0 - t/2 ∓ i·sin(π/3)·(x1 - x2).",
 4: "r4 is the radix-4 pass: two radix-2 layers, the odd difference rotated by -i.",
 5: "r5 is the radix-5 pass in the symmetric form: with a_k = x_k + x_(5-k) and\n// b_k = x_k - x_(5-k), v_j = x0 + Σ a_k cos(2πjk/5) - i Σ b_k sin(2πjk/5).",
 8: "r8 is the radix-8 pass: two 4-point DFTs, of the sums x_k + x_(k+4) (even\n// outputs) and of the differences x_k - x_(k+4) rotated by exp(-iπk/4)\n// (odd outputs). The inputs are read again for the second half, which is\n// cheaper than keeping all sixteen values in registers.",
}

def indent(body, n):
    return "\n".join("\t"*n + l if l else l for l in body.strip().split("\n"))

def sub(body, inf, stf):
    body = re.sub(r"\$IN\((\d+)\)", lambda m: inf(int(m.group(1))), body)
    body = re.sub(r"\$ST\((\d+)\)", lambda m: stf(int(m.group(1))), body)
    return body

def twst(i, target):
    if i == 0:
        return f"{target} = complex(vr, vi)"
    a, b = 2*i-2, 2*i-1
    return f"{target} = complex(vr*w[{a}]-vi*w[{b}], vr*w[{b}]+vi*w[{a}])"

out = []
for r in [2, 3, 4, 5, 8]:
    k2 = 2*(r-1)
    setup = []
    setup.append(f"\t\tx0 := x[xb+g.xo[0] : xb+g.xo[0]+s]")
    for k in range(1, r):
        setup.append(f"\t\tx{k} := x[xb+g.xo[{k}] : xb+g.xo[{k}]+s][:len(x0)]")
    for i in range(r):
        setup.append(f"\t\ty{i} := y[yb+g.yo[{i}] : yb+g.yo[{i}]+s][:len(x0)]")
    setup = "\n".join(setup)
    body = bodies[r]
    # twiddled general
    b = sub(body, lambda k: f"x{k}[q]", lambda i: twst(i, f"y{i}[q]"))
    out.append(f"""// {docs[r]}
func r{r}(y, x []complex128, tw []float64, g *geom) {{
	s := g.s
	for p := 1; p < g.m; p++ {{ // group 0 has unit twiddles: see r{r}notw
		w := [{k2}]float64(tw[{k2}*p : {k2}*p+{k2}])
		xb, yb := p*g.xstep, p*g.ystep
{setup}
		for q := range x0 {{
{indent(b, 3)}
		}}
	}}
}}
""")
    # last: must read all inputs before the first store (it may run in place)
    lb = bodies8last if r == 8 else body
    b = sub(lb, lambda k: f"x{k}[q]", lambda i: f"y{i}[q] = complex(vr*scale, vi*scale)")
    out.append(f"""// r{r}last is the last radix-{r} pass: no twiddles, outputs times scale.
func r{r}last(y, x []complex128, g *geom, scale float64) {{
	s := g.s
	for p := range g.m {{
		xb, yb := p*g.xstep, p*g.ystep
{setup}
		for q := range x0 {{
{indent(b, 3)}
		}}
	}}
}}
""")
    b = sub(lb, lambda k: f"x{k}[q]", lambda i: f"y{i}[q] = complex(vr, vi)")
    out.append(f"""// r{r}notw is a radix-{r} pass over the first groups groups without twiddles
// or scaling: group 0 of every pass, and a last pass with scale 1.
func r{r}notw(y, x []complex128, g *geom, groups int) {{
	s := g.s
	for p := range groups {{
		xb, yb := p*g.xstep, p*g.ystep
{setup}
		for q := range x0 {{
{indent(b, 3)}
		}}
	}}
}}
""")
    if r in (4, 8):
        su = [f"\tm := g.m", f"\tx0 := x[g.xo[0] : g.xo[0]+m]"]
        for k in range(1, r):
            su.append(f"\tx{k} := x[g.xo[{k}] : g.xo[{k}]+m][:len(x0)]")
        su = "\n".join(su)
        b = sub(body, lambda k: f"x{k}[p]", lambda i: twst(i, f"o[{i}]"))
        out.append(f"""// r{r}s1 is r{r} for s = 1, the first pass of a single sequence (never the
// last, so its output slots are in natural order): every butterfly has its
// own twiddles and writes {r} adjacent outputs.
func r{r}s1(y, x []complex128, tw []float64, g *geom) {{
{su}
	for p := 1; p < len(x0); p++ {{ // group 0: r{r}notw
		w := tw[{k2}*p : {k2}*p+{k2} : {k2}*p+{k2}]
		o := y[{r}*p : {r}*p+{r} : {r}*p+{r}]
{indent(b, 2)}
	}}
}}

""")
src = """// Code generated by gen_kernels.py; DO NOT EDIT.

package fft

""" + "\n".join(out)
res = subprocess.run(["gofmt"], input=src, capture_output=True, text=True, check=True)
with open("kernels_gen.go", "w") as f:
    f.write(res.stdout)
