package out

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"unicode/utf8"

	xfont "golang.org/x/image/font"
	"golang.org/x/image/font/basicfont"
	"golang.org/x/image/math/fixed"
	"gonum.org/v1/plot/font"
)

// Tile is one picture of a montage with its caption.
type Tile struct {
	Title string      // printed above the picture, e.g. "truth", "R=4, wavelet-L1"
	Note  string      // optional smaller line under the picture, e.g. "error ×5, ±0.05"
	Image image.Image // e.g. from GrayImage, DivergingImage or MaskImage
}

// MontageOptions lays out a montage. The zero value is usable.
type MontageOptions struct {
	// Columns is the number of tiles per row; 0 puts all tiles in one row.
	Columns int
	// Scale is the integer nearest-neighbour magnification of every tile;
	// 0 picks the smallest one that makes the smallest tile at least 192
	// pixels on its longer side (at most 8).
	Scale int
	// Gap is the white space between tiles, in pixels; 0 means 12.
	Gap int
}

// montage limits: the longest side of the result, in pixels.
const montageMaxSide = 1 << 15

// Montage draws the tiles side by side on white, in rows of
// opt.Columns, each centred in a cell as large as the largest tile, with its
// title above (truncated with "…" to the cell width) and its note below.
// Titles use Liberation Sans through gonum.org/v1/plot's font cache, with
// the fixed 7×13 font of golang.org/x/image/font/basicfont as the fallback.
func Montage(tiles []Tile, opt MontageOptions) (*image.RGBA, error) {
	if len(tiles) == 0 {
		return nil, errors.New("out: montage has no tiles")
	}
	if opt.Columns < 0 || opt.Scale < 0 || opt.Gap < 0 {
		return nil, fmt.Errorf("out: montage options %+v: negative values", opt)
	}
	minSide, cellW, cellH := montageMaxSide, 0, 0
	for i, t := range tiles {
		if t.Image == nil {
			return nil, fmt.Errorf("out: montage tile %d (%q) has no image", i+1, t.Title)
		}
		b := t.Image.Bounds()
		if b.Empty() {
			return nil, fmt.Errorf("out: montage tile %d (%q) is empty", i+1, t.Title)
		}
		minSide = min(minSide, max(b.Dx(), b.Dy()))
		cellW, cellH = max(cellW, b.Dx()), max(cellH, b.Dy())
	}
	scale := opt.Scale
	if scale == 0 {
		scale = max(1, min(8, (192+minSide-1)/minSide))
	}
	gap := opt.Gap
	if gap == 0 {
		gap = 12
	}
	cols := opt.Columns
	if cols == 0 || cols > len(tiles) {
		cols = len(tiles)
	}
	rows := (len(tiles) + cols - 1) / cols
	cellW, cellH = cellW*scale, cellH*scale

	titleFace, noteFace := captionFace(13), captionFace(11)
	titleH := faceHeight(titleFace)
	noteH := 0
	for _, t := range tiles {
		if t.Note != "" {
			noteH = faceHeight(noteFace) + 2
		}
	}
	blockH := titleH + 4 + cellH + noteH
	width := gap + cols*(cellW+gap)
	height := gap + rows*(blockH+gap)
	if width > montageMaxSide || height > montageMaxSide {
		return nil, fmt.Errorf("out: montage would be %d×%d pixels, over the %d limit; lower Scale or add rows", width, height, montageMaxSide)
	}

	dst := image.NewRGBA(image.Rect(0, 0, width, height))
	draw.Draw(dst, dst.Bounds(), image.NewUniform(color.White), image.Point{}, draw.Src)
	ink := image.NewUniform(inkColor)
	muted := image.NewUniform(mutedInk)
	for i, t := range tiles {
		r, c := i/cols, i%cols
		x0 := gap + c*(cellW+gap)
		y0 := gap + r*(blockH+gap)
		drawCaption(dst, titleFace, ink, t.Title, x0, y0, cellW)
		b := t.Image.Bounds()
		w, h := b.Dx()*scale, b.Dy()*scale
		ix := x0 + (cellW-w)/2
		iy := y0 + titleH + 4 + (cellH-h)/2
		blitScaled(dst, t.Image, ix, iy, scale)
		if t.Note != "" {
			drawCaption(dst, noteFace, muted, t.Note, x0, y0+titleH+4+cellH+2, cellW)
		}
	}
	return dst, nil
}

// WriteMontagePNG draws the montage (see Montage) and writes it as PNG to
// path atomically.
func WriteMontagePNG(path string, tiles []Tile, opt MontageOptions) error {
	m, err := Montage(tiles, opt)
	if err != nil {
		return fmt.Errorf("%w (writing %s)", err, path)
	}
	return WritePNG(path, m)
}

// captionFace returns Liberation Sans at px pixels, or the fixed basic font
// if the font cache cannot provide it.
func captionFace(px float64) (face xfont.Face) {
	defer func() {
		if recover() != nil {
			face = basicfont.Face7x13
		}
	}()
	f := font.DefaultCache.Lookup(font.Font{Typeface: "Liberation", Variant: "Sans"}, font.Length(px))
	if f.Face == nil { // the cache is filled by gonum.org/v1/plot's init
		return basicfont.Face7x13
	}
	return f.FontFace(72)
}

func faceHeight(f xfont.Face) int {
	m := f.Metrics()
	return (m.Ascent + m.Descent).Ceil()
}

// drawCaption centres txt in [x0, x0+width) with its top at y0, cut to fit.
func drawCaption(dst draw.Image, face xfont.Face, src image.Image, txt string, x0, y0, width int) {
	if txt == "" {
		return
	}
	txt = fitText(face, txt, width)
	w := xfont.MeasureString(face, txt).Ceil()
	d := xfont.Drawer{
		Dst:  dst,
		Src:  src,
		Face: face,
		Dot:  fixed.P(x0+max(0, (width-w)/2), y0+face.Metrics().Ascent.Ceil()),
	}
	d.DrawString(txt)
}

// fitText shortens txt with a trailing "…" until it fits width pixels.
func fitText(face xfont.Face, txt string, width int) string {
	if xfont.MeasureString(face, txt).Ceil() <= width {
		return txt
	}
	for len(txt) > 0 {
		_, n := utf8.DecodeLastRuneInString(txt)
		txt = txt[:len(txt)-n]
		if xfont.MeasureString(face, txt+"…").Ceil() <= width {
			return txt + "…"
		}
	}
	return ""
}

// blitScaled copies src magnified scale times (nearest neighbour) to dst
// with its top-left corner at (x0, y0). Pixels are copied, not blended:
// tiles are expected to be opaque.
func blitScaled(dst *image.RGBA, src image.Image, x0, y0, scale int) {
	b := src.Bounds()
	if scale == 1 {
		draw.Draw(dst, image.Rect(x0, y0, x0+b.Dx(), y0+b.Dy()), src, b.Min, draw.Src)
		return
	}
	gray, _ := src.(*image.Gray)
	rgba, _ := src.(*image.RGBA)
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			var c color.RGBA
			switch {
			case gray != nil:
				v := gray.Pix[gray.PixOffset(x, y)]
				c = color.RGBA{v, v, v, 0xFF}
			case rgba != nil:
				o := rgba.PixOffset(x, y)
				c = color.RGBA{rgba.Pix[o], rgba.Pix[o+1], rgba.Pix[o+2], rgba.Pix[o+3]}
			default:
				r, g, bl, a := src.At(x, y).RGBA()
				c = color.RGBA{uint8(r >> 8), uint8(g >> 8), uint8(bl >> 8), uint8(a >> 8)}
			}
			dx := x0 + (x-b.Min.X)*scale
			dy := y0 + (y-b.Min.Y)*scale
			for yy := dy; yy < dy+scale; yy++ {
				off := dst.PixOffset(dx, yy)
				for xx := 0; xx < scale; xx++ {
					p := dst.Pix[off+4*xx : off+4*xx+4 : off+4*xx+4]
					p[0], p[1], p[2], p[3] = c.R, c.G, c.B, c.A
				}
			}
		}
	}
}
