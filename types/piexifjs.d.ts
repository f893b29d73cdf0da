// piexifjs 1.0 ships no types: the part the tests use (EXIF 2.3 IFDs as tag-number maps, binary strings).
declare module 'piexifjs' {
  type Rational = [number, number];
  type IfdValue = string | number | number[] | Rational | Rational[];
  interface ExifObject {
    '0th'?: Record<number, IfdValue>;
    Exif?: Record<number, IfdValue>;
    GPS?: Record<number, IfdValue>;
    Interop?: Record<number, IfdValue>;
    '1st'?: Record<number, IfdValue>;
    thumbnail?: string | null;
  }
  const piexif: {
    dump(exif: ExifObject): string;
    insert(exifBytes: string, jpegBinary: string): string;
    load(jpegBinary: string): ExifObject;
    ImageIFD: Record<string, number>;
    ExifIFD: Record<string, number>;
    GPSIFD: Record<string, number>;
  };
  export default piexif;
}
