package plans

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"path/filepath"

	"accelplan/simulate"
)

// PhantomImage names the user's own object as the phantom: a gridded
// magnitude image treated as constant over each of its pixels, whose
// spectrum is then exact (simulate.ImagePhantom). Because a gridded object
// invites the inverse crime, it is refined to at least twice the
// reconstruction grid unless it already is that fine, with a notice.
const PhantomImage = "image"

// userImage loads and checks the user's object of an MRI plan.
func (v *validator) userImage(p *Plan) {
	o := &p.Object
	if o.Phantom != PhantomImage {
		v.fail("object", -1, "image", "an image file needs phantom = \"image\"", "set object.phantom = \"image\", or remove image and slice")
		return
	}
	if o.Image == "" {
		v.fail("object", -1, "image", "missing", "name an 8- or 16-bit PNG or a NIfTI-1 file (.nii, .nii.gz), relative to the plan")
		return
	}
	if o.Partitions != 0 {
		v.fail("object", -1, "image", "the user's object is 2D", "remove partitions, or use the 3D phantom")
		return
	}
	path := o.Image
	if !filepath.IsAbs(path) && p.Source != "" {
		path = filepath.Join(filepath.Dir(p.Source), path)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		v.fail("object", -1, "image", fmt.Sprintf("cannot read %s: %v", path, err), "check the path; it is relative to the plan's folder")
		return
	}
	sum := sha256.Sum256(b)
	im, notes, err := simulate.LoadImagePhantomSlice(path, o.Slice)
	if err != nil {
		v.fail("object", -1, "image", err.Error(), "give an 8- or 16-bit greyscale PNG or a NIfTI-1 magnitude image; for a volume set slice")
		return
	}
	fine, more, err := im.ForGrid(o.PhaseLines, o.ReadoutPoints)
	if err != nil {
		v.fail("object", -1, "image", err.Error(), "")
		return
	}
	p.image, p.imageHash = fine, hex.EncodeToString(sum[:12])
	p.ImageNotices = append(notes, more...)
	for _, s := range p.Schemes {
		if s.NonCartesian() && p.Scanner.Coils > 1 {
			v.fail("scanner", -1, "coils", "coil data of a gridded object off the Cartesian grid are not simulated", "use Cartesian schemes with coils, or coils = 1")
			return
		}
	}
}
