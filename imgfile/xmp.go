package imgfile

import "fmt"

// XMPKeyword is the PNG text keyword of embedded XMP metadata, always
// written as an uncompressed iTXt chunk (Adobe XMP Specification Part 3,
// "Storage in files", PNG: iTXt chunk with keyword "XML:com.adobe.xmp").
const XMPKeyword = "XML:com.adobe.xmp"

// GPanoXMP returns an XMP packet that marks a w×h image as a whole-sphere
// equirectangular panorama in the photo-sphere (GPano) vocabulary, namespace
// http://ns.google.com/photos/1.0/panorama/ (Google, "Photo Sphere XMP
// Metadata"): ProjectionType equirectangular, UsePanoramaViewer, the full
// panorama and the cropped area both the whole image at (0, 0). Panorama
// viewers read it to show the image as a sphere instead of a flat picture.
func GPanoXMP(w, h int) string {
	return fmt.Sprintf(`<?xpacket begin="`+"\ufeff"+`" id="W5M0MpCehiHzreSzNTczkc9d"?>
<x:xmpmeta xmlns:x="adobe:ns:meta/">
 <rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#">
  <rdf:Description rdf:about="" xmlns:GPano="http://ns.google.com/photos/1.0/panorama/">
   <GPano:ProjectionType>equirectangular</GPano:ProjectionType>
   <GPano:UsePanoramaViewer>True</GPano:UsePanoramaViewer>
   <GPano:FullPanoWidthPixels>%d</GPano:FullPanoWidthPixels>
   <GPano:FullPanoHeightPixels>%d</GPano:FullPanoHeightPixels>
   <GPano:CroppedAreaImageWidthPixels>%d</GPano:CroppedAreaImageWidthPixels>
   <GPano:CroppedAreaImageHeightPixels>%d</GPano:CroppedAreaImageHeightPixels>
   <GPano:CroppedAreaLeftPixels>0</GPano:CroppedAreaLeftPixels>
   <GPano:CroppedAreaTopPixels>0</GPano:CroppedAreaTopPixels>
  </rdf:Description>
 </rdf:RDF>
</x:xmpmeta>
<?xpacket end="r"?>`, w, h, w, h)
}
